import { FilterActions, FilterInput, FilterSelect } from "@/components/ui/filter-fields";
import { REVISION_STATUSES } from "@/db/schema";
import { RULE_IDS } from "@/lib/gcode/types";
import type { ProgramListQuery } from "@/lib/vault-validation";
import { STATUS_LABELS } from "./status-badge";

/**
 * The programs filters as a plain GET form: the filters live in the address, so a filtered list can be bookmarked
 * or sent to a colleague, and the form works before any script has loaded.
 */
export function ProgramFilters({ query, machines }: { query: ProgramListQuery; machines: { id: number; name: string }[] }) {
  return (
    <form role="search" aria-label="Filter programs" method="get" action="/programs" className="grid gap-3 rounded-lg border border-rule bg-panel p-4 sm:grid-cols-2 lg:grid-cols-4">
      <FilterInput label="Search" name="q" type="search" value={query.q} placeholder="Program number, title, part number or name" className="sm:col-span-2" />
      <FilterInput label="Part number starts with" name="part" value={query.part} />
      <FilterInput label="Program number starts with" name="program" value={query.program} />
      <FilterSelect label="Machine" name="machine" value={query.machine} any="Any machine" options={machines.map((m) => ({ value: m.id, label: m.name }))} />
      <FilterSelect
        label="Status"
        name="status"
        value={query.status}
        any="Any status"
        options={REVISION_STATUSES.map((s) => ({ value: s, label: s === "released" ? "Has a released revision" : `Newest is ${STATUS_LABELS[s].toLowerCase()}` }))}
      />
      <FilterInput label="Uses tool number" name="tool" type="number" min={0} max={99999} inputMode="numeric" value={query.tool} />
      <FilterSelect label="Has a finding of rule" name="rule" value={query.rule} any="Any or none" options={RULE_IDS.map((r) => ({ value: r, label: r }))} />
      <FilterInput label="Calls work offset" name="offset" value={query.offset} placeholder="G55" />
      {query.sort !== "updated" && <input type="hidden" name="sort" value={query.sort} />}
      {query.dir && <input type="hidden" name="dir" value={query.dir} />}
      <FilterActions clearHref="/programs" className="sm:col-span-2 lg:col-span-3">
        <p className="text-xs text-ink-soft">Tool, rule and status look at each program&apos;s newest revision.</p>
      </FilterActions>
    </form>
  );
}
