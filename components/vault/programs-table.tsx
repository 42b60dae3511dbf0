"use client";

import Link from "next/link";
import { usePathname, useRouter, useSearchParams } from "next/navigation";
import { useTransition } from "react";
import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  useReactTable,
  type SortingState,
  type Updater,
} from "@tanstack/react-table";
import type { ProgramListItem } from "@/lib/dal/programs";
import type { PROGRAM_SORTS } from "@/lib/vault-validation";
import { formatDuration, formatWhen } from "./format";
import { AnalysisBadge, FindingCounts, StatusBadge } from "./status-badge";

type SortKey = (typeof PROGRAM_SORTS)[number];

const col = createColumnHelper<ProgramListItem>();

/** Column id -> the server's sort key; columns without one are not sortable. */
const SORT_KEYS: Record<string, SortKey> = {
  program: "programNumber",
  part: "part",
  machine: "machine",
  latest: "status",
  updated: "updated",
};

const columns = [
  col.accessor("programNumber", {
    id: "program",
    header: "Program",
    cell: ({ row }) => (
      <div className="min-w-40">
        <Link href={`/programs/${row.original.id}`} className="font-semibold text-brand hover:underline">
          {row.original.programNumber}
        </Link>
        <p className="text-ink-soft">
          {row.original.title}
          {row.original.operation && <span> · {row.original.operation}</span>}
        </p>
      </div>
    ),
  }),
  col.accessor((p) => p.part.number, {
    id: "part",
    header: "Part",
    cell: ({ row }) => (
      <div>
        <span className="font-medium">{row.original.part.number}</span>
        <p className="text-ink-soft">{row.original.part.name}</p>
      </div>
    ),
  }),
  col.accessor((p) => p.machine.name, { id: "machine", header: "Machine" }),
  col.accessor((p) => p.latest?.status ?? null, {
    id: "latest",
    header: "Newest revision",
    cell: ({ row }) => {
      const l = row.original.latest;
      if (!l) return <span className="text-ink-soft">No revisions yet</span>;
      return (
        <div className="space-y-1">
          <Link href={`/revisions/${l.id}`} className="mr-2 text-brand hover:underline">
            Rev {l.number}
          </Link>
          <StatusBadge status={l.status} />
          <div>
            <AnalysisBadge state={l.analysisState as never} />
          </div>
        </div>
      );
    },
  }),
  col.accessor((p) => p.released?.number ?? null, {
    id: "released",
    header: "Released",
    cell: ({ row }) =>
      row.original.released ? (
        <Link href={`/revisions/${row.original.released.id}`} className="font-medium text-ok hover:underline">
          Rev {row.original.released.number}
        </Link>
      ) : (
        <span className="text-ink-soft">None</span>
      ),
  }),
  col.display({
    id: "checks",
    header: "Findings",
    cell: ({ row }) => <FindingCounts errors={row.original.latest?.errorCount} warnings={row.original.latest?.warningCount} />,
  }),
  col.display({
    id: "time",
    header: "Run time",
    cell: ({ row }) => <span className="tabular-nums">{formatDuration(row.original.latest?.totalSeconds)}</span>,
  }),
  col.accessor("updatedAt", {
    id: "updated",
    header: "Changed",
    cell: ({ getValue }) => {
      const [day, time] = formatWhen(getValue()).split(" ");
      return (
        <span className="whitespace-nowrap tabular-nums">
          {day}
          <span className="block text-xs text-ink-soft">{time} UTC</span>
        </span>
      );
    },
  }),
];

/**
 * The programs list: a headless table over one server page. Sorting and paging are the server's: changing them
 * rewrites the URL (so a filtered, sorted view can be shared), and the page re-renders with the new rows.
 */
export function ProgramsTable({
  rows,
  total,
  page,
  pageSize,
  sort,
  dir,
}: {
  rows: ProgramListItem[];
  total: number;
  page: number;
  pageSize: number;
  sort: SortKey;
  dir: "asc" | "desc";
}) {
  const router = useRouter();
  const pathname = usePathname();
  const params = useSearchParams();
  const [pending, startTransition] = useTransition();
  const pageCount = Math.max(1, Math.ceil(total / pageSize));
  const sortColumn = Object.entries(SORT_KEYS).find(([, k]) => k === sort)?.[0];
  const sorting: SortingState = sortColumn ? [{ id: sortColumn, desc: dir === "desc" }] : [];

  const hrefWith = (changes: Record<string, string | null>) => {
    const next = new URLSearchParams(params.toString());
    for (const [k, v] of Object.entries(changes)) {
      if (v === null) next.delete(k);
      else next.set(k, v);
    }
    const qs = next.toString();
    return qs ? `${pathname}?${qs}` : pathname;
  };

  const onSortingChange = (updater: Updater<SortingState>) => {
    const next = typeof updater === "function" ? updater(sorting) : updater;
    const first = next[0];
    const key = first ? SORT_KEYS[first.id] : undefined;
    startTransition(() => {
      router.push(hrefWith({ sort: key ?? null, dir: key ? (first!.desc ? "desc" : "asc") : null, page: null }), { scroll: false });
    });
  };

  const table = useReactTable({
    data: rows,
    columns,
    getCoreRowModel: getCoreRowModel(),
    manualSorting: true,
    manualPagination: true,
    enableMultiSort: false,
    enableSortingRemoval: false,
    sortDescFirst: false,
    pageCount,
    state: { sorting, pagination: { pageIndex: page - 1, pageSize } },
    onSortingChange,
    getRowId: (r) => String(r.id),
  });

  return (
    <div className="space-y-3" aria-busy={pending}>
      <div className={`overflow-x-auto rounded-lg border border-rule bg-panel transition-opacity ${pending ? "opacity-60" : ""}`}>
        <table className="w-full text-left text-sm" data-testid="programs-table">
          <thead className="border-b border-rule bg-paper text-xs uppercase tracking-wide text-ink-soft">
            {table.getHeaderGroups().map((hg) => (
              <tr key={hg.id}>
                {hg.headers.map((h) => {
                  const sortable = h.column.id in SORT_KEYS;
                  const state = h.column.getIsSorted();
                  return (
                    <th
                      key={h.id}
                      scope="col"
                      className="px-3 py-2 align-bottom"
                      aria-sort={state === "asc" ? "ascending" : state === "desc" ? "descending" : undefined}
                    >
                      {sortable ? (
                        <button
                          type="button"
                          onClick={h.column.getToggleSortingHandler()}
                          className="inline-flex items-center gap-1 uppercase tracking-wide hover:text-ink"
                        >
                          {flexRender(h.column.columnDef.header, h.getContext())}
                          <span aria-hidden className="text-[10px]">
                            {state === "asc" ? "▲" : state === "desc" ? "▼" : "↕"}
                          </span>
                        </button>
                      ) : (
                        flexRender(h.column.columnDef.header, h.getContext())
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody>
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className="border-b border-rule align-top last:border-0 hover:bg-paper/60" data-program={row.original.programNumber}>
                {row.getVisibleCells().map((cell) => (
                  <td key={cell.id} className="px-3 py-2">
                    {flexRender(cell.column.columnDef.cell, cell.getContext())}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <nav aria-label="Pages" className="flex flex-wrap items-center gap-3 text-sm">
        <span className="text-ink-soft tabular-nums">
          Page {page} of {pageCount}
        </span>
        {page > 1 && (
          <Link href={hrefWith({ page: String(page - 1) })} className="rounded-md border border-rule bg-panel px-3 py-2" scroll={false}>
            Previous
          </Link>
        )}
        {page < pageCount && (
          <Link href={hrefWith({ page: String(page + 1) })} className="rounded-md border border-rule bg-panel px-3 py-2" scroll={false}>
            Next
          </Link>
        )}
        {pending && <span role="status">Loading…</span>}
      </nav>
    </div>
  );
}
