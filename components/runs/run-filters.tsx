import Link from "next/link";
import type { RunListQuery } from "@/lib/vault-validation";

const field = "w-full rounded-md border border-rule bg-white px-2 py-2 text-sm";

/** The record's filters as a plain GET form, so a filtered record lives in the address and can be bookmarked. */
export function RunFilters({
  query,
  machines,
  operators,
}: {
  query: RunListQuery;
  machines: { id: number; name: string }[];
  operators: { id: number; name: string }[];
}) {
  const v = (x: string | number | undefined) => (x === undefined ? "" : String(x));
  return (
    <form role="search" aria-label="Filter runs" method="get" action="/runs" className="grid gap-3 rounded-lg border border-rule bg-panel p-4 sm:grid-cols-2 lg:grid-cols-5">
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
        <span className="mb-1 block font-medium">Program number</span>
        <input name="program" defaultValue={v(query.program)} placeholder="O2207, or how it starts" className={field} />
      </label>
      <label className="text-sm">
        <span className="mb-1 block font-medium">Signed off by</span>
        <select name="operator" defaultValue={v(query.operator)} className={field}>
          <option value="">Anyone</option>
          {operators.map((o) => (
            <option key={o.id} value={o.id}>
              {o.name}
            </option>
          ))}
        </select>
      </label>
      <label className="text-sm">
        <span className="mb-1 block font-medium">From (UTC day)</span>
        <input name="from" type="date" defaultValue={v(query.from)} className={field} />
      </label>
      <label className="text-sm">
        <span className="mb-1 block font-medium">To (UTC day)</span>
        <input name="to" type="date" defaultValue={v(query.to)} className={field} />
      </label>
      {query.programId !== undefined && <input type="hidden" name="programId" value={query.programId} />}
      <div className="flex items-end gap-2 sm:col-span-2 lg:col-span-5">
        <button type="submit" className="min-h-10 rounded-md bg-brand px-4 py-2 text-sm font-semibold text-white hover:bg-brand-strong">
          Apply filters
        </button>
        <Link href="/runs" className="min-h-10 rounded-md border border-rule px-4 py-2 text-sm">
          Clear
        </Link>
      </div>
    </form>
  );
}
