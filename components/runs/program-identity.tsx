import { formatBytes, formatInt } from "@/components/vault/format";
import type { ProgramHeader } from "@/lib/program-file";
import { programNumberValue, shaGroups } from "@/lib/run-checklist";
import { StepHeading } from "./step-heading";

export interface ProgramIdentityProps {
  programNumber: string;
  /** The O number the file itself carries (the engine's reading), or null. */
  fileProgramNumber: number | null;
  revisionNumber: number;
  fileName: string;
  size: number;
  lineCount: number;
  sha256: string;
  header: ProgramHeader | null;
}

/** Step 1: what identifies the program on the control, to compare one by one. */
export function ProgramIdentity(p: ProgramIdentityProps) {
  const expected = programNumberValue(p.programNumber);
  const numberDiffers = p.fileProgramNumber !== null && expected !== null && p.fileProgramNumber !== expected;
  return (
    <div className="space-y-4" data-testid="program-identity">
      <StepHeading n={1} id="step-1" title="The program on the control">
        Open it at the control and compare each of these.
      </StepHeading>
      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-6">
        {(
          [
            ["Program number", p.programNumber, null, "identity-program", "sm:col-span-1"],
            ["Revision", String(p.revisionNumber), null, "identity-revision", "sm:col-span-1"],
            ["File name", p.fileName, null, "identity-file", "col-span-2 sm:col-span-2"],
            ["Size", `${formatInt(p.size)} bytes`, formatBytes(p.size), "identity-size", "sm:col-span-1"],
            ["Lines", formatInt(p.lineCount), null, "identity-lines", "sm:col-span-1"],
          ] as const
        ).map(([k, v, note, id, span]) => (
          <div key={k} className={`rounded-lg border border-rule bg-white p-3 ${span}`}>
            <dt className="text-xs uppercase tracking-wide text-ink-soft">{k}</dt>
            <dd className="mt-1 text-lg font-semibold [overflow-wrap:anywhere]" data-testid={id}>
              {v}
              {note && <span className="block text-xs font-normal text-ink-soft">{note}</span>}
            </dd>
          </div>
        ))}
      </dl>
      {numberDiffers && (
        <p role="alert" className="rounded-md bg-bad/10 px-3 py-2 text-sm font-semibold text-bad">
          The file itself is numbered O{p.fileProgramNumber}, not {p.programNumber}: the control stores it under that number.
        </p>
      )}
      <div>
        <p className="text-sm font-medium">SHA-256, in groups of four</p>
        <p className="mt-1 grid grid-cols-4 gap-x-4 gap-y-1 rounded-lg border border-rule bg-white p-3 font-mono text-lg sm:grid-cols-8" data-testid="sha-groups" aria-label={`SHA-256 ${p.sha256}`}>
          {shaGroups(p.sha256).map((g, i) => (
            <span key={i} className="tabular-nums">
              {g}
            </span>
          ))}
        </p>
      </div>
      <div>
        <p className="text-sm font-medium">Opening lines, as the control shows them</p>
        {p.header && p.header.lines.length > 0 ? (
          <pre className="mt-1 overflow-x-auto rounded-lg bg-ink p-3 font-mono text-sm leading-6 text-white" data-testid="program-header">
            {p.header.lines.map((l) => (
              <span key={l.line} className="block">
                <span className="mr-3 inline-block w-8 text-right text-white/50 select-none tabular-nums">{l.line}</span>
                {l.text}
              </span>
            ))}
            {p.header.truncated && <span className="block text-white/60">…</span>}
          </pre>
        ) : (
          <p className="mt-1 text-sm text-ink-soft">The program starts with code: it has no comment lines to compare.</p>
        )}
      </div>
    </div>
  );
}
