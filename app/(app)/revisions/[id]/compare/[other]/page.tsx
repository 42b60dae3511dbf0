import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { CheckCaution } from "@/components/ui/check-caution";
import { EmptyState } from "@/components/ui/empty-state";
import { AnalysisDiffView } from "@/components/vault/analysis-diff-view";
import { DiffView } from "@/components/vault/diff-view";
import { formatWhen, plural } from "@/components/vault/format";
import { StatusBadge } from "@/components/vault/status-badge";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { getProgram } from "@/lib/dal/programs";
import { compareRevisions } from "@/lib/dal/revisions";
import { pageId } from "@/lib/page-params";

export const metadata: Metadata = { title: "Compare revisions" };

type Props = { params: Promise<{ id: string; other: string }> };

export default async function ComparePage({ params }: Props) {
  await requirePagePermission("readPrograms");
  const p = await params;
  const aId = pageId(p.id);
  const bId = pageId(p.other);
  if (!aId || !bId) notFound();
  const cmp = await compareRevisions(aId, bId);
  if (!cmp) notFound();
  const { a, b, lines, analysis } = cmp;
  const program = await getProgram(b.programId);
  const aLabel = `revision ${a.number}`;
  const bLabel = `revision ${b.number}`;
  return (
    <div className="space-y-6">
      <div>
        <p className="text-sm">
          <Link href="/programs" className="text-brand hover:underline">Programs</Link> /{" "}
          <Link href={`/programs/${b.programId}`} className="text-brand hover:underline">{program?.programNumber ?? "Program"}</Link> / Compare
        </p>
        <h1 className="mt-1 text-2xl font-semibold">
          Revision {a.number} → revision {b.number}
        </h1>
        <div className="mt-2 grid gap-2 text-sm sm:grid-cols-2">
          {[a, b].map((r, i) => (
            <p key={r.id} className="flex flex-wrap items-center gap-2">
              <span className="text-ink-soft">{i === 0 ? "From" : "To"}</span>
              <Link href={`/revisions/${r.id}`} className="font-semibold text-brand hover:underline">
                Revision {r.number}
              </Link>
              <StatusBadge status={r.status} />
              <span className="text-ink-soft tabular-nums">
                {r.fileName} · {formatWhen(r.createdAt)}
              </span>
            </p>
          ))}
        </div>
        {a.programId !== b.programId && <p className="mt-2 text-sm text-warn">These revisions belong to two different programs.</p>}
        <p className="mt-2">
          <Link href={`/revisions/${b.id}/compare/${a.id}`} className="text-sm text-brand hover:underline">
            Swap sides
          </Link>
        </p>
      </div>

      <CheckCaution />

      <section aria-labelledby="checks" className="space-y-3">
        <h2 id="checks" className="text-lg font-semibold">What changed in the checks</h2>
        {analysis ? (
          <AnalysisDiffView diff={analysis} />
        ) : (
          <EmptyState title="The checks are compared once the server has checked both revisions." />
        )}
      </section>

      <section aria-labelledby="lines" className="space-y-3">
        <h2 id="lines" className="text-lg font-semibold">
          Changed lines{" "}
          <span className="text-base font-normal text-ink-soft" data-testid="diff-counts">
            {lines.identical ? "the files are identical" : `${plural(lines.removed, "line")} removed, ${plural(lines.added, "line")} added`}
          </span>
        </h2>
        {lines.truncated && <p className="text-sm text-warn">Only the first changes are shown; the counts above are complete. Download both files to see every line.</p>}
        {lines.identical ? (
          <p className="rounded-lg border border-rule bg-panel p-4 text-sm">Byte for byte the same lines ({plural(lines.aLines, "line")}).</p>
        ) : (
          <DiffView hunks={lines.hunks} aLabel={aLabel} bLabel={bLabel} />
        )}
      </section>
    </div>
  );
}
