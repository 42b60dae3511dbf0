import type { Metadata } from "next";
import Link from "next/link";
import { CheckCaution } from "@/components/ui/check-caution";
import { EmptyState } from "@/components/ui/empty-state";
import { ProgramFilters } from "@/components/vault/program-filters";
import { IgnoredFilters } from "@/components/ui/filter-fields";
import { ProgramsTable } from "@/components/vault/programs-table";
import { plural } from "@/components/vault/format";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { can } from "@/lib/auth/roles";
import { listMachines } from "@/lib/dal/machines";
import { listPrograms } from "@/lib/dal/programs";
import { parseSearch, type SearchParams } from "@/lib/search-params";
import { PROGRAM_SORTS, programListSchema } from "@/lib/vault-validation";

export const metadata: Metadata = { title: "Programs" };

const DEFAULT_DIR: Record<(typeof PROGRAM_SORTS)[number], "asc" | "desc"> = {
  programNumber: "asc",
  title: "asc",
  part: "asc",
  machine: "asc",
  status: "asc",
  updated: "desc",
};

export default async function ProgramsPage({ searchParams }: { searchParams: Promise<SearchParams> }) {
  const user = await requirePagePermission("readPrograms");
  const { query, ignored } = parseSearch(programListSchema, await searchParams);
  const [list, machines] = await Promise.all([listPrograms(query), listMachines()]);
  const filtered = ["q", "part", "program", "machine", "status", "tool", "rule", "offset"].some(
    (k) => query[k as keyof typeof query] !== undefined,
  );
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div>
          <h1 className="text-2xl font-semibold">Programs</h1>
          <p className="text-sm text-ink-soft">Every NC program of the shop, with its newest and its released revision.</p>
        </div>
        {can(user.role, "writePrograms") && (
          <Link href="/programs/new" className="rounded-md bg-brand px-4 py-2 text-sm font-semibold text-white hover:bg-brand-strong">
            New program
          </Link>
        )}
      </div>
      <CheckCaution />
      <ProgramFilters query={query} machines={machines.map((m) => ({ id: m.id, name: m.name }))} />
      <IgnoredFilters ignored={ignored} />
      <p className="text-sm text-ink-soft" role="status" data-testid="programs-count">
        {plural(list.total, "program")}
        {filtered ? " match the filters" : ""}
      </p>
      {list.programs.length === 0 ? (
        filtered ? (
          <EmptyState title="No program matches these filters.">
            <Link href="/programs" className="text-brand hover:underline">
              Clear the filters
            </Link>
          </EmptyState>
        ) : (
          <EmptyState title="No programs yet.">
            {can(user.role, "writePrograms") ? "Start with New program, then upload its first revision." : "A programmer adds them."}
          </EmptyState>
        )
      ) : (
        <ProgramsTable
          rows={list.programs}
          total={list.total}
          page={list.page}
          pageSize={list.pageSize}
          sort={query.sort}
          dir={query.dir ?? DEFAULT_DIR[query.sort]}
        />
      )}
    </div>
  );
}
