import Link from "next/link";
import { formatNumber, formatWhen, shortSha } from "@/components/vault/format";
import type { RunView } from "@/lib/dal/runs";

const th = "px-3 py-2 font-semibold";
const td = "px-3 py-2 align-top";

/**
 * Runs signed off at the machines, newest first: when, which revision of which program on which machine, who, how
 * many parts, the offsets and tools confirmed, the SHA-256 signed. `view` "overview" leaves out the checks and the
 * e-mails; "program" (a program's own page) names only the revision and leaves out the machine.
 */
export function RunTable({ runs, view = "record", testId = "run-table" }: { runs: RunView[]; view?: "record" | "overview" | "program"; testId?: string }) {
  const compact = view === "overview";
  const inProgram = view === "program";
  return (
    <div className="overflow-x-auto rounded-lg border border-rule bg-panel">
      <table className="w-full text-left text-sm" data-testid={testId}>
        <thead className="border-b border-rule bg-paper text-xs uppercase tracking-wide text-ink-soft">
          <tr>
            <th className={th}>Signed off (UTC)</th>
            <th className={th}>{inProgram ? "Revision" : "Program"}</th>
            {!inProgram && <th className={th}>Machine</th>}
            <th className={th}>By</th>
            <th className={th}>Parts</th>
            {!compact && <th className={th}>Checked</th>}
            <th className={th}>SHA-256</th>
          </tr>
        </thead>
        <tbody>
          {runs.map((r) => (
            <tr key={r.id} className="border-b border-rule last:border-0" data-run={r.id}>
              <td className={`${td} whitespace-nowrap tabular-nums`}>{formatWhen(r.signedAt)}</td>
              <td className={td}>
                <Link href={`/revisions/${r.revision.id}`} className="font-semibold text-brand hover:underline">
                  {inProgram ? `Revision ${r.revision.number}` : `${r.program.programNumber} rev ${r.revision.number}`}
                </Link>
                <span className="block text-xs text-ink-soft">
                  {inProgram ? null : r.program.title}
                  {r.revision.status !== "released" && <>{inProgram ? "" : " · "}now {r.revision.status}</>}
                </span>
              </td>
              {!inProgram && (
                <td className={`${td} whitespace-nowrap`}>
                  <Link href={`/machines/${r.machine.id}`} className="hover:underline">
                    {r.machine.name}
                  </Link>
                </td>
              )}
              <td className={td}>
                {r.operator.name}
                {view === "record" && <span className="block text-xs text-ink-soft">{r.operator.email}</span>}
              </td>
              <td className={`${td} tabular-nums`}>{r.quantity ?? "—"}</td>
              {!compact && (
                <td className={td}>
                  <details>
                    <summary className="cursor-pointer">
                      {r.offsets.map((o) => o.code).join(" ") || "no offsets"} · {r.tools.map((t) => `T${t.number}`).join(" ") || "no tools"}
                    </summary>
                    <ul className="mt-1 space-y-0.5 text-xs tabular-nums">
                      {r.offsets.map((o) => (
                        <li key={o.code}>
                          {o.code}:{" "}
                          {o.x === null ? (
                            <span className="text-warn">not recorded</span>
                          ) : (
                            <>
                              X {formatNumber(o.x)} Y {formatNumber(o.y)} Z {formatNumber(o.z)}
                              {o.setBy && <span className="text-ink-soft"> (by {o.setBy.name})</span>}
                            </>
                          )}
                        </li>
                      ))}
                      {r.tools.map((t) => (
                        <li key={t.number}>
                          T{t.number} {t.lengthOffsets.map((h) => `H${h}`).join(" ")} {t.diameterOffsets.map((d) => `D${d}`).join(" ")}
                        </li>
                      ))}
                    </ul>
                  </details>
                </td>
              )}
              <td className={`${td} font-mono text-xs`} title={r.sha256}>
                {shortSha(r.sha256)}…
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
