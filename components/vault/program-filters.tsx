import Link from "next/link";
import { REVISION_STATUSES } from "@/db/schema";
import { RULE_IDS } from "@/lib/gcode/types";
import type { ProgramListQuery } from "@/lib/vault-validation";
import { STATUS_LABELS } from "./status-badge";

const field = "w-full rounded-md border border-rule bg-white px-2 py-2 text-sm";

/**
 * The programs filters as a plain GET form: the filters live in the address, so a filtered list can be bookmarked
 * or sent to a colleague, and the form works before any script has loaded.
 */
export function ProgramFilters({ query, machines }: { query: ProgramListQuery; machines: { id: number; name: string }[] }) {
  const v = (x: string | number | undefined) => (x === undefined ? "" : String(x));
  return (
    <form role="search" aria-label="Filter programs" method="get" action="/programs" className="grid gap-3 rounded-lg border border-rule bg-panel p-4 sm:grid-cols-2 lg:grid-cols-4">
      <label className="text-sm sm:col-span-2">
        <span className="mb-1 block font-medium">Search</span>
        <input name="q" type="search" defaultValue={v(query.q)} placeholder="Program number, title, part number or name" className={field} />
      </label>
      <label className="text-sm">
        <span className="mb-1 block font-medium">Part number starts with</span>
        <input name="part" defaultValue={v(query.part)} className={field} />
      </label>
      <label className="text-sm">
        <span className="mb-1 block font-medium">Program number starts with</span>
        <input name="program" defaultValue={v(query.program)} className={field} />
      </label>
      <label className="text-sm">
        <span className="mb-1 block font-medium">Machine</span>
        <select name="machine" defaultValue={v(query.machine)} className={field}>
          <option value="">Any machine</option>
          {machines.map((m) => (
            <option key={m.id} value={m.id}>
              {m.name}
            </option>
          ))}
        </select>
      </label>
      <label className="text-sm">
        <span className="mb-1 block font-medium">Status</span>
        <select name="status" defaultValue={v(query.status)} className={field}>
          <option value="">Any status</option>
          {REVISION_STATUSES.map((s) => (
            <option key={s} value={s}>
              {s === "released" ? "Has a released revision" : `Newest is ${STATUS_LABELS[s].toLowerCase()}`}
            </option>
          ))}
        </select>
      </label>
      <label className="text-sm">
        <span className="mb-1 block font-medium">Uses tool number</span>
        <input name="tool" type="number" min={0} max={99999} inputMode="numeric" defaultValue={v(query.tool)} className={field} />
      </label>
      <label className="text-sm">
        <span className="mb-1 block font-medium">Has a finding of rule</span>
        <select name="rule" defaultValue={v(query.rule)} className={field}>
          <option value="">Any or none</option>
          {RULE_IDS.map((r) => (
            <option key={r} value={r}>
              {r}
            </option>
          ))}
        </select>
      </label>
      <label className="text-sm">
        <span className="mb-1 block font-medium">Calls work offset</span>
        <input name="offset" defaultValue={v(query.offset)} placeholder="G55" className={field} />
      </label>
      {query.sort !== "updated" && <input type="hidden" name="sort" value={query.sort} />}
      {query.dir && <input type="hidden" name="dir" value={query.dir} />}
      <div className="flex items-end gap-2 sm:col-span-2 lg:col-span-3">
        <button type="submit" className="min-h-10 rounded-md bg-brand px-4 py-2 text-sm font-semibold text-white hover:bg-brand-strong">
          Apply filters
        </button>
        <Link href="/programs" className="min-h-10 rounded-md border border-rule px-4 py-2 text-sm">
          Clear
        </Link>
        <p className="text-xs text-ink-soft">Tool, rule and status look at each program&apos;s newest revision.</p>
      </div>
    </form>
  );
}
