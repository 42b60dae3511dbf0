import type { AnalysisDiff, Change } from "@/lib/compare/analysis-diff";
import type { Bounds } from "@/lib/gcode/types";
import { formatDuration, formatRange } from "./format";

const TIME_LABELS: Record<keyof AnalysisDiff["time"], string> = {
  totalSeconds: "Total (estimate)",
  feedSeconds: "Cutting",
  rapidSeconds: "Rapid",
  dwellSeconds: "Dwell",
  toolChangeSeconds: "Tool changes",
};

const FIELD_LABELS: Record<string, string> = {
  description: "description",
  lengthOffsets: "length offsets",
  diameterOffsets: "diameter offsets",
  loads: "loads",
  lowestZ: "lowest Z",
  spindle: "spindle",
  feed: "feed",
};

function show(v: unknown): string {
  if (v === null || v === undefined) return "—";
  if (Array.isArray(v)) return v.length === 0 ? "none" : v.join(", ");
  if (typeof v === "object" && "min" in (v as object) && "max" in (v as object)) {
    const r = v as { min: number; max: number };
    return r.min === r.max ? String(r.min) : `${r.min} – ${r.max}`;
  }
  if (typeof v === "number") return String(Math.round(v * 1000) / 1000);
  return String(v);
}

const boundsText = (b: Bounds) => (["x", "y", "z"] as const).map((k) => `${k.toUpperCase()} ${formatRange(b.min[k], b.max[k])}`).join(" · ");

function BoundsChange({ label, change }: { label: string; change: Change<Bounds> | null }) {
  return (
    <div>
      <dt className="text-ink-soft">{label}</dt>
      <dd className="tabular-nums">
        {change ? (
          <>
            <span className="block text-bad line-through decoration-1">{boundsText(change.from)}</span>
            <span className="block text-ok">{boundsText(change.to)}</span>
          </>
        ) : (
          "unchanged"
        )}
      </dd>
    </div>
  );
}

const signed = (s: number) => `${s > 0 ? "+" : s < 0 ? "−" : "±"}${formatDuration(Math.abs(s))}`;

/** What changed in the checks: tools, work offsets, extent, time and findings, new and resolved. */
export function AnalysisDiffView({ diff }: { diff: AnalysisDiff }) {
  const t = diff.tools;
  const toolsSame = t.added.length === 0 && t.removed.length === 0 && t.changed.length === 0;
  return (
    <div className="grid gap-4 lg:grid-cols-2" data-testid="analysis-diff">
      <section className="space-y-2 rounded-lg border border-rule bg-panel p-4">
        <h3 className="font-semibold">Tools</h3>
        {toolsSame && <p className="text-sm text-ink-soft">Same tools, same settings.</p>}
        {t.added.length > 0 && <p className="text-sm text-ok">Added: {t.added.map((n) => `T${n}`).join(", ")}</p>}
        {t.removed.length > 0 && <p className="text-sm text-bad">Removed: {t.removed.map((n) => `T${n}`).join(", ")}</p>}
        {t.changed.length > 0 && (
          <ul className="space-y-1 text-sm">
            {t.changed.map((c) => (
              <li key={c.number}>
                <strong>T{c.number}</strong>:{" "}
                {Object.entries(c.changes)
                  .map(([k, ch]) =>
                    k === "totalSeconds"
                      ? `time ${formatDuration(Number(ch.from))} → ${formatDuration(Number(ch.to))}`
                      : `${FIELD_LABELS[k] ?? k} ${show(ch.from)} → ${show(ch.to)}`,
                  )
                  .join("; ")}
              </li>
            ))}
          </ul>
        )}
        {diff.toolOrder && <p className="text-sm">Order: {diff.toolOrder.from} → {diff.toolOrder.to}</p>}
        {diff.toolChangeCount && (
          <p className="text-sm">
            Tool changes: {diff.toolChangeCount.from} → {diff.toolChangeCount.to}
          </p>
        )}
        {diff.units && (
          <p className="text-sm font-semibold text-warn">
            Units changed: {diff.units.from} → {diff.units.to}
          </p>
        )}
      </section>

      <section className="space-y-2 rounded-lg border border-rule bg-panel p-4">
        <h3 className="font-semibold">Work offsets and extent</h3>
        {diff.offsets.added.length === 0 && diff.offsets.removed.length === 0 && !diff.offsets.order ? (
          <p className="text-sm text-ink-soft">Same work offsets.</p>
        ) : (
          <div className="text-sm">
            {diff.offsets.added.length > 0 && <p className="text-ok">Now also calls {diff.offsets.added.join(", ")}</p>}
            {diff.offsets.removed.length > 0 && <p className="text-bad">No longer calls {diff.offsets.removed.join(", ")}</p>}
            {diff.offsets.order && (
              <p>
                Order: {diff.offsets.order.from.join(", ")} → {diff.offsets.order.to.join(", ")}
              </p>
            )}
          </div>
        )}
        <dl className="space-y-2 text-sm">
          <BoundsChange label="All moves" change={diff.bounds.all} />
          <BoundsChange label="Cutting moves" change={diff.bounds.cutting} />
        </dl>
      </section>

      <section className="space-y-2 rounded-lg border border-rule bg-panel p-4">
        <h3 className="font-semibold">Time</h3>
        <table className="w-full text-sm">
          <thead className="text-left text-xs uppercase tracking-wide text-ink-soft">
            <tr>
              <th className="py-1">Part</th>
              <th className="py-1">Before</th>
              <th className="py-1">After</th>
              <th className="py-1">Change</th>
            </tr>
          </thead>
          <tbody>
            {(Object.keys(TIME_LABELS) as (keyof AnalysisDiff["time"])[]).map((k) => {
              const c = diff.time[k];
              return (
                <tr key={k} className="border-t border-rule/60">
                  <td className="py-1">{TIME_LABELS[k]}</td>
                  <td className="py-1 tabular-nums">{formatDuration(c.from)}</td>
                  <td className="py-1 tabular-nums">{formatDuration(c.to)}</td>
                  <td className={`py-1 tabular-nums ${Math.abs(c.delta) < 0.5 ? "text-ink-soft" : ""}`}>{signed(c.delta)}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </section>

      <section className="space-y-2 rounded-lg border border-rule bg-panel p-4">
        <h3 className="font-semibold">Findings</h3>
        <p className="text-sm text-ink-soft">
          {diff.findings.new.length} new, {diff.findings.resolved.length} resolved, {diff.findings.unchanged} unchanged (matched by rule and message; lines move).
        </p>
        {diff.findings.new.length > 0 && (
          <ul className="space-y-1 text-sm" data-testid="findings-new">
            {diff.findings.new.map((f, i) => (
              <li key={`n${i}`} className={f.severity === "error" ? "text-bad" : ""}>
                <span className="font-semibold">New</span> line {f.line} ({f.severity}): {f.message}
              </li>
            ))}
          </ul>
        )}
        {diff.findings.resolved.length > 0 && (
          <ul className="space-y-1 text-sm" data-testid="findings-resolved">
            {diff.findings.resolved.map((f, i) => (
              <li key={`r${i}`} className="text-ok">
                <span className="font-semibold">Resolved</span> was line {f.line} ({f.severity}): {f.message}
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
