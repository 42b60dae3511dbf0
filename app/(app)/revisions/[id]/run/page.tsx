import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { CheckCaution } from "@/components/ui/check-caution";
import { ProgramIdentity } from "@/components/runs/program-identity";
import { RunChecklist } from "@/components/runs/run-checklist";
import { RunSummary } from "@/components/runs/run-summary";
import type { StoredResult } from "@/components/vault/analysis-tables";
import { formatWhen } from "@/components/vault/format";
import { RefreshWhenChecked } from "@/components/vault/refresh-when-checked";
import { StatusBadge } from "@/components/vault/status-badge";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { can } from "@/lib/auth/roles";
import { getMachine } from "@/lib/dal/machines";
import { programRevisions } from "@/lib/dal/programs";
import { getRevision, type RevisionDetail } from "@/lib/dal/revisions";
import { getRun, readRevisionHeader } from "@/lib/dal/runs";
import { listWorkOffsets } from "@/lib/dal/work-offsets";
import { pageId } from "@/lib/page-params";
import { inLoadOrder } from "@/lib/run-checklist";
import { flattenSearch, type SearchParams } from "@/lib/search-params";
import { signOffRunAction } from "../../../runs/actions";

type Props = { params: Promise<{ id: string }>; searchParams: Promise<SearchParams> };

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const id = pageId((await params).id);
  return { title: id ? `Check before cycle start · revision ${id}` : "Check before cycle start" };
}

const NOT_RUNNABLE: Record<string, string> = {
  draft: "is a draft: it is not reviewed and may not run",
  submitted: "is waiting for a lead's review: it may not run before it is released",
  rejected: "was rejected by a lead: it may not run",
  superseded: "is superseded by a newer revision: it may no longer run",
};

/** Why this revision may not be signed off now, or null when it may. */
function refusal(rev: RevisionDetail): { kind: "status" | "check"; text: string } | null {
  const label = `${rev.program.programNumber} revision ${rev.number}`;
  if (rev.status !== "released") return { kind: "status", text: `${label} ${NOT_RUNNABLE[rev.status]}.` };
  const state = rev.analysis?.state;
  if (state === "queued" || state === "running") {
    return { kind: "check", text: `The server is checking ${label} again (a new engine or a changed machine setting); sign-off waits until the check is done.` };
  }
  if (state !== "done") return { kind: "check", text: `The server's check of ${label} failed: ${rev.analysis?.error ?? "no reason given"}. Ask the programmer or a lead.` };
  return null;
}

/**
 * The released revision at the machine: what to check before cycle start, in the order an operator works, and the
 * sign-off with their password. Any other revision shows a refusal to run and the way to the released one.
 */
export default async function RunCheckPage({ params, searchParams }: Props) {
  const user = await requirePagePermission("readRuns");
  const id = pageId((await params).id);
  if (!id) notFound();
  const rev = await getRevision(id, { withResult: true });
  if (!rev) notFound();
  const signedId = pageId(flattenSearch(await searchParams).signed ?? "");
  const [machine, recorded, header, siblings, signed] = await Promise.all([
    getMachine(rev.program.machine.id),
    listWorkOffsets(rev.program.machine.id),
    readRevisionHeader(id),
    programRevisions(rev.programId),
    signedId ? getRun(signedId) : null,
  ]);
  if (!machine) notFound();
  const justSigned = signed && signed.revision.id === id ? signed : null;
  const a = rev.analysis;
  const result = a?.state === "done" ? (rev.result as StoredResult | null) : null;
  const released = siblings.find((s) => s.id === rev.program.releasedRevisionId) ?? null;
  const supersededBy = rev.supersededById ? siblings.find((s) => s.id === rev.supersededById) : null;
  const refused = refusal(rev);
  const label = `${rev.program.programNumber} revision ${rev.number}`;

  const identity = (
    <ProgramIdentity
      programNumber={rev.program.programNumber}
      fileProgramNumber={result?.programNumber ?? null}
      revisionNumber={rev.number}
      fileName={rev.fileName}
      size={rev.size}
      lineCount={rev.lineCount}
      sha256={rev.sha256}
      header={header}
    />
  );

  return (
    <div className="mx-auto max-w-5xl space-y-6">
      <div>
        <p className="text-sm">
          <Link href="/programs" className="text-brand hover:underline">Programs</Link> /{" "}
          <Link href={`/programs/${rev.program.id}`} className="text-brand hover:underline">{rev.program.programNumber}</Link> /{" "}
          <Link href={`/revisions/${rev.id}`} className="text-brand hover:underline">Revision {rev.number}</Link> / Check before cycle start
        </p>
        <div className="mt-1 flex flex-wrap items-center gap-x-4 gap-y-2">
          <h1 className="text-2xl font-semibold">Check before cycle start</h1>
          <StatusBadge status={rev.status} />
          <span className="ml-auto flex flex-wrap gap-2 text-sm">
            <Link href={`/revisions/${rev.id}`} className="inline-flex min-h-11 items-center rounded-md border border-rule bg-panel px-4 hover:bg-paper" data-testid="to-revision">
              3D backplot and code
            </Link>
            <Link href={`/runs?programId=${rev.program.id}`} className="inline-flex min-h-11 items-center rounded-md border border-rule bg-panel px-4 hover:bg-paper">
              Runs of {rev.program.programNumber}
            </Link>
          </span>
        </div>
        <p className="mt-1 text-ink-soft">
          {rev.program.programNumber} revision {rev.number} · {rev.program.title} · {rev.program.part.number} {rev.program.part.name} · {machine.name}
        </p>
      </div>

      {refused?.kind === "status" ? (
        <section role="alert" aria-labelledby="refusal" className="space-y-3 rounded-xl border-4 border-bad bg-bad/10 p-5" data-testid="run-refusal">
          <h2 id="refusal" className="text-2xl font-bold text-bad">Do not run this revision</h2>
          <p className="text-lg">
            {supersededBy ? (
              <>
                {label} was superseded by revision {supersededBy.number}
                {rev.supersededAt && <> on <span className="tabular-nums">{formatWhen(rev.supersededAt)}</span></>}: it may no longer run.
              </>
            ) : (
              refused.text
            )}
          </p>
          {released ? (
            <Link
              href={`/revisions/${released.id}/run`}
              className="inline-flex min-h-14 items-center rounded-lg bg-ok px-6 text-lg font-semibold text-white hover:opacity-90"
              data-testid="to-released"
            >
              Check the released revision {released.number} instead
            </Link>
          ) : (
            <p className="font-semibold">No revision of {rev.program.programNumber} is released: nothing of it may run.</p>
          )}
        </section>
      ) : (
        <section
          aria-label="Release"
          className={`rounded-xl border-4 p-5 ${refused ? "border-warn bg-warn/10" : "border-ok bg-ok/10"}`}
          data-testid="run-verdict"
        >
          <p className={`text-2xl font-bold ${refused ? "text-warn" : "text-ok"}`}>This is the released revision of {rev.program.programNumber}.</p>
          <p className="mt-1">
            Revision {rev.number}, released by {rev.decidedBy?.name ?? "a lead"}
            {rev.decidedAt && <> on <span className="tabular-nums">{formatWhen(rev.decidedAt)}</span></>}.
          </p>
          {refused && <p className="mt-2 font-semibold text-warn">{refused.text}</p>}
        </section>
      )}
      {a && (a.state === "queued" || a.state === "running") && <RefreshWhenChecked revisionIds={[rev.id]} />}

      <CheckCaution />

      {justSigned && (
        <section role="status" aria-labelledby="signed" className="space-y-2 rounded-xl border-2 border-ok bg-panel p-5" data-testid="run-signed">
          <h2 id="signed" className="text-xl font-semibold text-ok">Signed off: run {justSigned.id} is recorded</h2>
          <p>
            {justSigned.operator.name} signed off {label} on {justSigned.machine.name} at{" "}
            <span className="tabular-nums">{formatWhen(justSigned.signedAt)}</span>
            {justSigned.quantity !== null && <>, {justSigned.quantity} parts planned</>}. Work offsets{" "}
            {justSigned.offsets.map((o) => o.code).join(", ") || "none"}; tools {justSigned.tools.map((t) => `T${t.number}`).join(", ") || "none"}.
          </p>
          <p className="text-sm text-ink-soft">
            Signed SHA-256 <code className="font-mono break-all">{justSigned.sha256}</code>
          </p>
          <p className="flex flex-wrap gap-3 pt-1 text-sm">
            <Link href="/runs" className="font-semibold text-brand hover:underline">The record of runs</Link>
            <Link href={`/revisions/${rev.id}/run`} className="text-brand hover:underline">Check again for another run</Link>
          </p>
        </section>
      )}

      {refused?.kind === "status" || !result ? (
        <section className="space-y-4 rounded-xl border border-rule bg-panel p-5">{identity}</section>
      ) : justSigned ? null : (
        <RunChecklist
          action={signOffRunAction.bind(null, rev.id)}
          sha256={rev.sha256}
          label={label}
          machine={{ id: machine.id, name: machine.name, units: machine.units, manualToolChange: machine.manualToolChange }}
          units={result.units}
          offsets={rev.offsets.map((o) => {
            const v = recorded.offsets.find((r) => r.code === o.code);
            return { code: o.code, firstLine: o.firstLine, value: v ? { x: v.x, y: v.y, z: v.z, setAt: v.setAt, setBy: v.setBy?.name ?? null } : null };
          })}
          tools={inLoadOrder(result.tools, a?.toolSequence ?? []).map((t) => ({
            number: t.number,
            description: t.description,
            lengthOffsets: t.lengthOffsets,
            diameterOffsets: t.diameterOffsets,
            lowestZ: t.lowestZ,
            loads: t.loads,
            firstLine: t.firstLine,
          }))}
          changes={result.toolChanges.map((c) => ({ line: c.line, tool: c.tool }))}
          mayCheck={can(user.role, "signOffRuns") && refused === null}
          identity={identity}
          summary={
            <RunSummary
              revisionId={rev.id}
              machine={{ name: machine.name, units: machine.units, manualToolChange: machine.manualToolChange }}
              units={result.units}
              safeZ={result.safeZ}
              totalSeconds={a?.totalSeconds ?? null}
              partsPerCycle={result.parts}
              toolChangeCount={result.toolChangeCount}
              stops={result.stops ?? null}
              errors={rev.findings
                .filter((f) => f.severity === "error")
                .map((f) => {
                  const w = rev.signatures.find((s) => s.meaning === "waived" && s.finding?.rule === f.rule && s.finding.line === f.line);
                  return { rule: f.rule, line: f.line, message: f.message, waiver: w ? { by: w.signer.name, at: w.signedAt, reason: w.comment } : null };
                })}
              unlistedErrors={rev.findingCounts.filter((c) => c.severity === "error").reduce((n, c) => n + Math.max(0, c.count - c.listed), 0)}
              warnings={rev.findings.filter((f) => f.severity === "warning").map((f) => ({ rule: f.rule, line: f.line, message: f.message }))}
              warningCount={a?.warningCount ?? 0}
            />
          }
        />
      )}
    </div>
  );
}
