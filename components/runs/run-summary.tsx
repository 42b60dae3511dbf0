import Link from "next/link";
import { formatDuration, formatNumber, formatWhen, plural } from "@/components/vault/format";
import { StepHeading } from "./step-heading";

export interface SummaryFinding {
  rule: string;
  line: number;
  message: string;
}

export interface RunSummaryProps {
  revisionId: number;
  machine: { name: string; units: "mm" | "inch"; manualToolChange: boolean };
  units: "mm" | "inch";
  safeZ: number | null;
  totalSeconds: number | null;
  partsPerCycle: number;
  toolChangeCount: number;
  stops: { programStops: number; optionalStops: number } | null;
  /** Error findings, each with the lead's waiver when there is one. */
  errors: (SummaryFinding & { waiver: { by: string; at: string; reason: string } | null })[];
  /** Error findings beyond the listed ones. */
  unlistedErrors: number;
  warnings: SummaryFinding[];
  warningCount: number;
}

const WARNINGS_SHOWN = 12;

/** Step 4: the figures an operator looks at before starting, and what the checks found (errors with their waivers). */
export function RunSummary(p: RunSummaryProps) {
  const cards: [string, string][] = [
    ["Machine", `${p.machine.name} (${p.machine.units}, ${p.machine.manualToolChange ? "tools by hand" : "tool changer"})`],
    ["Program units", p.units],
    ["Safe Z", p.safeZ === null ? "—" : `${formatNumber(p.safeZ)} ${p.units}`],
    ["Run time (estimate)", `${formatDuration(p.totalSeconds)}${p.partsPerCycle > 1 ? ` for ${p.partsPerCycle} parts` : ""}`],
    ["Tool changes", String(p.toolChangeCount)],
    [
      "Stops",
      p.stops && p.stops.programStops + p.stops.optionalStops > 0
        ? [p.stops.programStops > 0 ? plural(p.stops.programStops, "program stop") : "", p.stops.optionalStops > 0 ? plural(p.stops.optionalStops, "optional stop") : ""].filter(Boolean).join(", ")
        : "none",
    ],
  ];
  return (
    <section aria-labelledby="step-4" className="space-y-4 rounded-xl border border-rule bg-panel p-5" data-testid="run-summary">
      <StepHeading n={4} id="step-4" title="Before you start">
        Look at the 3D backplot and the code on the{" "}
        <Link href={`/revisions/${p.revisionId}`} className="text-brand underline">
          revision page
        </Link>{" "}
        if anything below is new to you.
      </StepHeading>
      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-3">
        {cards.map(([k, v]) => (
          <div key={k} className="rounded-lg border border-rule bg-white p-3">
            <dt className="text-xs uppercase tracking-wide text-ink-soft">{k}</dt>
            <dd className="mt-1 font-semibold tabular-nums">{v}</dd>
          </div>
        ))}
      </dl>
      <div className="space-y-2">
        <h3 className="font-semibold">
          Findings: {plural(p.errors.length + p.unlistedErrors, "error")}, {plural(p.warningCount, "warning")}
        </h3>
        {p.errors.length === 0 && p.warnings.length === 0 && <p className="text-sm text-ink-soft">The checks found no error and no warning.</p>}
        {p.errors.length > 0 && (
          <ul className="space-y-2" data-testid="run-errors">
            {p.errors.map((f) => (
              <li key={`${f.rule}@${f.line}`} className="rounded-md border border-bad/40 bg-bad/5 p-3 text-sm">
                <p>
                  <span className="font-semibold text-bad">Error</span> on line <span className="tabular-nums">{f.line}</span>{" "}
                  <code className="text-xs">{f.rule}</code>: {f.message}
                </p>
                {f.waiver ? (
                  <p className="mt-1" data-testid="waiver">
                    Waived by <strong>{f.waiver.by}</strong> on <span className="tabular-nums">{formatWhen(f.waiver.at)}</span>: “{f.waiver.reason}”
                  </p>
                ) : (
                  <p className="mt-1 font-semibold text-bad">Not waived.</p>
                )}
              </li>
            ))}
          </ul>
        )}
        {p.unlistedErrors > 0 && <p className="text-sm text-bad">And {plural(p.unlistedErrors, "more error")} not listed.</p>}
        {p.warnings.length > 0 && (
          <ul className="space-y-1 text-sm" data-testid="run-warnings">
            {p.warnings.slice(0, WARNINGS_SHOWN).map((f) => (
              <li key={`${f.rule}@${f.line}`}>
                <span className="font-semibold text-warn">Warning</span> on line <span className="tabular-nums">{f.line}</span>: {f.message}
              </li>
            ))}
          </ul>
        )}
        {p.warningCount > Math.min(p.warnings.length, WARNINGS_SHOWN) && (
          <p className="text-sm text-ink-soft">
            {plural(p.warningCount - Math.min(p.warnings.length, WARNINGS_SHOWN), "more warning")} on the{" "}
            <Link href={`/revisions/${p.revisionId}`} className="text-brand underline">
              revision page
            </Link>
            .
          </p>
        )}
      </div>
    </section>
  );
}
