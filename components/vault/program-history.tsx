import Link from "next/link";
import type { AuditRow } from "@/lib/dal/audit";
import type { ProgramSignature } from "@/lib/dal/pages-program";
import type { SignatureView } from "@/lib/dal/revisions";
import { formatWhen } from "./format";

const MEANING: Record<SignatureView["meaning"], { label: string; className: string }> = {
  submitted: { label: "Submitted for review", className: "text-info" },
  released: { label: "Released", className: "text-ok" },
  rejected: { label: "Rejected", className: "text-bad" },
  waived: { label: "Waived a finding", className: "text-warn" },
};

/**
 * The electronic signatures of a program's revisions, oldest first: who signed, what the signature means, the
 * comment, when, and the SHA-256 of the exact bytes signed.
 */
export function SignatureHistory({ signatures }: { signatures: (SignatureView & { revision?: ProgramSignature["revision"] })[] }) {
  if (signatures.length === 0) return <p className="text-sm text-ink-soft">No signatures yet: nothing has been submitted, released or rejected.</p>;
  return (
    <ol className="space-y-3" data-testid="signatures">
      {signatures.map((s) => {
        const m = MEANING[s.meaning];
        return (
          <li key={s.id} className="rounded-md border border-rule p-3 text-sm" data-meaning={s.meaning}>
            <div className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
              <span className={`font-semibold ${m.className}`}>{m.label}</span>
              {s.revision && (
                <Link href={`/revisions/${s.revision.id}`} className="text-brand hover:underline">
                  revision {s.revision.number}
                </Link>
              )}
              <span>
                by <strong>{s.signer.name}</strong> <span className="text-ink-soft">({s.signer.email})</span>
              </span>
              <time dateTime={s.signedAt} className="text-ink-soft tabular-nums">{formatWhen(s.signedAt)}</time>
            </div>
            {s.finding && (
              <p className="mt-1">
                Finding <code className="font-mono">{s.finding.rule}</code> on line {s.finding.line}: {s.finding.message}
              </p>
            )}
            {s.comment && <p className="mt-1 whitespace-pre-wrap">“{s.comment}”</p>}
            <p className="mt-1 text-xs text-ink-soft">
              Signed SHA-256 <code className="font-mono break-all">{s.sha256}</code>
            </p>
          </li>
        );
      })}
    </ol>
  );
}

const num = (d: Record<string, unknown>) => (typeof d.number === "number" ? ` ${d.number}` : "");

/** One audit event of a program, in words. */
export function describeEvent(e: AuditRow): string {
  const d = (e.details && typeof e.details === "object" ? e.details : {}) as Record<string, unknown>;
  switch (e.action) {
    case "program.create":
      return "created the program";
    case "program.update": {
      const changed = d.changed && typeof d.changed === "object" ? Object.keys(d.changed) : [];
      return `changed ${changed.length > 0 ? changed.join(", ") : "nothing"}${d.reanalysed ? " (revisions checked again)" : ""}`;
    }
    case "revision.upload":
      return `uploaded revision${num(d)}${typeof d.fileName === "string" ? ` (${d.fileName})` : ""}${d.via === "api" ? " with an API token" : ""}`;
    case "revision.submit":
      return `submitted revision${num(d)} for review`;
    case "revision.release":
      return `released revision${num(d)}${typeof d.superseded === "number" ? `, superseding revision ${d.superseded}` : ""}`;
    case "revision.reject":
      return `rejected revision${num(d)}`;
    case "revision.waive": {
      const f = d.finding as { rule?: string; line?: number } | undefined;
      return `waived ${f?.rule ?? "a finding"}${f?.line !== undefined ? ` on line ${f.line}` : ""} of revision${num(d)}`;
    }
    case "revision.download":
      return `downloaded revision${num(d)}`;
    case "revision.view":
      return `looked at the code of revision${num(d)}${typeof d.repeated === "number" ? ` (and ${d.repeated} more times)` : ""}`;
    case "revision.delete-draft":
      return `deleted draft revision${num(d)}`;
    case "run.signed-off":
      return `signed off a run of revision${num(d)}${typeof d.quantity === "number" ? ` (${d.quantity} parts)` : ""}`;
    default:
      return e.action;
  }
}

/** A program's audit events, newest first. */
export function ProgramEvents({ events }: { events: AuditRow[] }) {
  if (events.length === 0) return <p className="text-sm text-ink-soft">No events yet.</p>;
  return (
    <div className="overflow-x-auto">
      <table className="w-full text-left text-sm" data-testid="program-events">
        <thead className="border-b border-rule text-xs uppercase tracking-wide text-ink-soft">
          <tr>
            <th className="py-2 pr-3">When</th>
            <th className="py-2 pr-3">Who</th>
            <th className="py-2 pr-3">What</th>
            <th className="py-2">From</th>
          </tr>
        </thead>
        <tbody>
          {events.map((e) => (
            <tr key={e.id} className="border-b border-rule/60 last:border-0" data-action={e.action}>
              <td className="py-1.5 pr-3 whitespace-nowrap tabular-nums">{formatWhen(e.at)}</td>
              <td className="py-1.5 pr-3">{e.actorEmail ?? "—"}</td>
              <td className="py-1.5 pr-3">{describeEvent(e)}</td>
              <td className="py-1.5 font-mono text-xs text-ink-soft">{e.ip ?? ""}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
