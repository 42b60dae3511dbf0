import { FilterActions, FilterInput, FilterSelect } from "@/components/ui/filter-fields";
import type { RunListQuery } from "@/lib/vault-validation";

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
  return (
    <form role="search" aria-label="Filter runs" method="get" action="/runs" className="grid gap-3 rounded-lg border border-rule bg-panel p-4 sm:grid-cols-2 lg:grid-cols-5">
      <FilterSelect label="Machine" name="machine" value={query.machine} any="Any machine" options={machines.map((m) => ({ value: m.id, label: m.name }))} />
      <FilterInput label="Program number" name="program" value={query.program} placeholder="O2207, or how it starts" />
      <FilterSelect label="Signed off by" name="operator" value={query.operator} any="Anyone" options={operators.map((o) => ({ value: o.id, label: o.name }))} />
      <FilterInput label="From (UTC day)" name="from" type="date" value={query.from} />
      <FilterInput label="To (UTC day)" name="to" type="date" value={query.to} />
      {query.programId !== undefined && <input type="hidden" name="programId" value={query.programId} />}
      <FilterActions clearHref="/runs" className="sm:col-span-2 lg:col-span-5" />
    </form>
  );
}
