import type { Analysis, Bounds } from "@/lib/gcode/types";
import type { WorkOffsetValue } from "@/lib/dal/work-offsets";
import { formatDuration, formatNumber, formatRange } from "./format";
import { LineLink } from "./revision-workspace";

/** The stored analysis (the engine's result without the toolpath), as far as these tables read it. */
export type StoredResult = Omit<Analysis, "toolpath">;

const range = (r: { min: number; max: number } | null, unit = "") =>
  r ? (r.min === r.max ? `${formatNumber(r.min)}${unit}` : `${formatNumber(r.min)} – ${formatNumber(r.max)}${unit}`) : "—";

const list = (xs: number[], prefix: string) => (xs.length === 0 ? "—" : xs.map((x) => `${prefix}${x}`).join(", "));

function boundsText(b: Bounds) {
  return (["x", "y", "z"] as const).map((k) => `${k.toUpperCase()} ${formatRange(b.min[k], b.max[k])}`).join(" · ");
}

const th = "px-3 py-2 font-semibold";
const td = "px-3 py-2 align-top";

/** Every tool: number, description, length and diameter offsets, spindle and feed ranges, time, lowest Z, first line. */
export function ToolTable({ result }: { result: StoredResult }) {
  const feedUnit = result.units === "inch" ? " in/min" : " mm/min";
  if (result.tools.length === 0) return <p className="text-sm text-ink-soft">The program loads no tools.</p>;
  return (
    <div className="overflow-x-auto rounded-lg border border-rule bg-panel">
      <table className="w-full text-left text-sm" data-testid="tool-table">
        <thead className="border-b border-rule bg-paper text-xs uppercase tracking-wide text-ink-soft">
          <tr>
            <th className={th}>Tool</th>
            <th className={th}>Description</th>
            <th className={th}>Length offsets</th>
            <th className={th}>Diameter offsets</th>
            <th className={th}>Spindle</th>
            <th className={th}>Feed</th>
            <th className={th}>Loads</th>
            <th className={th}>Time</th>
            <th className={th}>Lowest Z</th>
            <th className={th}>First line</th>
          </tr>
        </thead>
        <tbody>
          {result.tools.map((t) => (
            <tr key={t.number} className="border-b border-rule last:border-0" data-tool={t.number}>
              <td className={`${td} font-semibold tabular-nums`}>T{t.number}</td>
              <td className={td}>{t.description ?? <span className="text-ink-soft">no description in the program</span>}</td>
              <td className={`${td} tabular-nums`}>{list(t.lengthOffsets, "H")}</td>
              <td className={`${td} tabular-nums`}>{list(t.diameterOffsets, "D")}</td>
              <td className={`${td} whitespace-nowrap tabular-nums`}>{range(t.spindle, " rpm")}</td>
              <td className={`${td} whitespace-nowrap tabular-nums`}>{range(t.feed, feedUnit)}</td>
              <td className={`${td} tabular-nums`}>{t.loads}</td>
              <td className={`${td} tabular-nums`}>{formatDuration(t.time.totalSeconds)}</td>
              <td className={`${td} tabular-nums`}>{formatNumber(t.lowestZ)}</td>
              <td className={td}>
                <LineLink line={t.firstLine} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** Every work offset the program calls, with its time, tools, extent, and whether the machine has it set. */
export function OffsetTable({ result, machineOffsets }: { result: StoredResult; machineOffsets: WorkOffsetValue[] }) {
  if (result.workOffsets.length === 0) return <p className="text-sm text-ink-soft">The program calls no work offsets.</p>;
  const atMachine = new Map(machineOffsets.map((o) => [o.code, o]));
  return (
    <div className="overflow-x-auto rounded-lg border border-rule bg-panel">
      <table className="w-full text-left text-sm" data-testid="offset-table">
        <thead className="border-b border-rule bg-paper text-xs uppercase tracking-wide text-ink-soft">
          <tr>
            <th className={th}>Offset</th>
            <th className={th}>Selected on</th>
            <th className={th}>Tools</th>
            <th className={th}>Time</th>
            <th className={th}>Cutting extent (part coordinates)</th>
            <th className={th}>Set at the machine</th>
          </tr>
        </thead>
        <tbody>
          {result.workOffsets.map((o) => {
            const set = atMachine.get(o.code);
            return (
              <tr key={o.code} className="border-b border-rule last:border-0" data-offset={o.code}>
                <td className={`${td} font-semibold`}>{o.code}</td>
                <td className={td}>{o.firstLine !== null ? <LineLink line={o.firstLine} /> : <span className="text-ink-soft">never selected (default)</span>}</td>
                <td className={`${td} tabular-nums`}>{o.tools.length > 0 ? o.tools.map((n) => `T${n}`).join(" ") : "—"}</td>
                <td className={`${td} tabular-nums`}>{formatDuration(o.time.totalSeconds)}</td>
                <td className={`${td} tabular-nums`}>{boundsText(o.cuttingBounds)}</td>
                <td className={`${td} tabular-nums`}>
                  {set ? (
                    <span>
                      X {formatNumber(set.x)} · Y {formatNumber(set.y)} · Z {formatNumber(set.z)}
                      <span className="block text-xs text-ink-soft">by {set.setBy?.name ?? "—"}</span>
                    </span>
                  ) : (
                    <span className="font-medium text-warn">not recorded</span>
                  )}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

/** Overall and cutting extent of the program, part coordinates. */
export function BoundsList({ result }: { result: StoredResult }) {
  return (
    <dl className="grid gap-1 text-sm sm:grid-cols-[auto_1fr] sm:gap-x-4">
      <dt className="text-ink-soft">All moves</dt>
      <dd className="tabular-nums">{boundsText(result.bounds)}</dd>
      <dt className="text-ink-soft">Cutting moves</dt>
      <dd className="tabular-nums">{boundsText(result.cuttingBounds)}</dd>
    </dl>
  );
}
