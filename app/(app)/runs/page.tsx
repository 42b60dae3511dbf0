import type { Metadata } from "next";
import Link from "next/link";
import { EmptyState } from "@/components/ui/empty-state";
import { RunFilters } from "@/components/runs/run-filters";
import { IgnoredFilters } from "@/components/ui/filter-fields";
import { RunTable } from "@/components/runs/run-table";
import { plural } from "@/components/vault/format";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { listMachines } from "@/lib/dal/machines";
import { listRunOperators, listRuns } from "@/lib/dal/runs";
import { getProgram } from "@/lib/dal/programs";
import { parseSearch, type SearchParams } from "@/lib/search-params";
import { RUN_PAGE_SIZE, runListSchema } from "@/lib/vault-validation";

export const metadata: Metadata = { title: "Runs" };

const FILTERS = ["machine", "program", "programId", "operator", "from", "to"] as const;

/** The record of what ran: every run signed off at the machines, newest first, filtered in the address. */
export default async function RunsPage({ searchParams }: { searchParams: Promise<SearchParams> }) {
  await requirePagePermission("readRuns");
  const { query, ignored } = parseSearch(runListSchema, await searchParams);
  const [list, machines, operators, program] = await Promise.all([
    listRuns(query),
    listMachines(),
    listRunOperators(),
    query.programId ? getProgram(query.programId) : null,
  ]);
  const filtered = FILTERS.some((k) => query[k] !== undefined);
  const pages = Math.max(1, Math.ceil(list.total / list.pageSize));
  const pageLink = (page: number) => {
    const q = new URLSearchParams();
    for (const k of FILTERS) if (query[k] !== undefined) q.set(k, String(query[k]));
    if (query.pageSize !== RUN_PAGE_SIZE) q.set("pageSize", String(query.pageSize));
    q.set("page", String(page));
    return `/runs?${q.toString()}`;
  };
  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-semibold">Runs</h1>
        <p className="text-sm text-ink-soft">
          Every run signed off at the machines before cycle start: who checked which revision, with which work offset values and tools. The record
          is append-only.
        </p>
      </div>
      <RunFilters query={query} machines={machines.map((m) => ({ id: m.id, name: m.name }))} operators={operators} />
      {program && (
        <p className="text-sm">
          Only program{" "}
          <Link href={`/programs/${program.id}`} className="font-semibold text-brand hover:underline">
            {program.programNumber}
          </Link>{" "}
          ({program.title}, {program.machine.name}).{" "}
          <Link href="/runs" className="text-brand hover:underline">
            All programs
          </Link>
        </p>
      )}
      <IgnoredFilters ignored={ignored} />
      <p className="text-sm text-ink-soft" role="status" data-testid="runs-count">
        {plural(list.total, "run")}
        {filtered ? " match the filters" : ""}
        {pages > 1 && ` · page ${list.page} of ${pages}`}
      </p>
      {list.runs.length === 0 ? (
        filtered ? (
          <EmptyState title="No run matches these filters.">
            <Link href="/runs" className="text-brand hover:underline">
              Clear the filters
            </Link>
          </EmptyState>
        ) : (
          <EmptyState title="No run is signed off yet.">An operator signs off each run on the released revision&apos;s check page before cycle start.</EmptyState>
        )
      ) : (
        <RunTable runs={list.runs} />
      )}
      {pages > 1 && (
        <nav aria-label="Pages" className="flex gap-2 text-sm">
          {list.page > 1 && (
            <Link href={pageLink(list.page - 1)} className="rounded-md border border-rule bg-panel px-3 py-2">
              Newer
            </Link>
          )}
          {list.page < pages && (
            <Link href={pageLink(list.page + 1)} className="rounded-md border border-rule bg-panel px-3 py-2">
              Older
            </Link>
          )}
        </nav>
      )}
    </div>
  );
}
