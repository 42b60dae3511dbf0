import type { Metadata } from "next";
import Link from "next/link";
import { formatWhen } from "@/components/vault/format";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { listOutbox } from "@/lib/dal/outbox";
import { parseSearch, type SearchParams } from "@/lib/search-params";
import { outboxListSchema } from "@/lib/vault-validation";

export const metadata: Metadata = { title: "Mail outbox" };

const STATES = [
  { key: "pending", label: "Waiting", tone: "text-info" },
  { key: "sending", label: "Being sent", tone: "text-info" },
  { key: "sent", label: "Sent", tone: "text-ok" },
  { key: "failed", label: "Gave up", tone: "text-bad" },
] as const;

export default async function OutboxPage({ searchParams }: { searchParams: Promise<SearchParams> }) {
  await requirePagePermission("readOutbox");
  const { query } = parseSearch(outboxListSchema, await searchParams);
  const { messages, counts, total, page, pageSize } = await listOutbox(query);
  const pages = Math.max(1, Math.ceil(total / pageSize));
  const link = (changes: Record<string, string | undefined>) => {
    const q = new URLSearchParams();
    const next = { state: query.state, page: String(query.page), ...changes };
    for (const [k, v] of Object.entries(next)) if (v && !(k === "page" && v === "1")) q.set(k, v);
    const s = q.toString();
    return s ? `/admin/outbox?${s}` : "/admin/outbox";
  };
  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-semibold">Mail outbox</h1>
        <p className="text-sm text-ink-soft">
          Every mail the vault sends is written here in the same transaction as the change it reports, then sent with retries. Nothing is lost in a crash and
          nothing is sent twice.
        </p>
      </div>
      <nav aria-label="Filter by state" className="flex flex-wrap gap-2 text-sm">
        <Link href={link({ state: undefined, page: "1" })} aria-current={!query.state ? "page" : undefined} className={`rounded-md border px-3 py-1.5 ${!query.state ? "border-brand bg-brand text-white" : "border-rule bg-panel"}`}>
          All <span className="tabular-nums">({Object.values(counts).reduce((a, b) => a + b, 0)})</span>
        </Link>
        {STATES.map((s) => (
          <Link
            key={s.key}
            href={link({ state: s.key, page: "1" })}
            aria-current={query.state === s.key ? "page" : undefined}
            className={`rounded-md border px-3 py-1.5 ${query.state === s.key ? "border-brand bg-brand text-white" : "border-rule bg-panel"}`}
          >
            {s.label} <span className="tabular-nums">({counts[s.key]})</span>
          </Link>
        ))}
      </nav>
      <div className="overflow-x-auto rounded-lg border border-rule bg-panel">
        <table className="w-full text-left text-sm" data-testid="outbox">
          <thead className="border-b border-rule bg-paper text-xs uppercase tracking-wide text-ink-soft">
            <tr>
              <th className="px-3 py-2">Queued</th>
              <th className="px-3 py-2">Subject and recipients</th>
              <th className="px-3 py-2">State</th>
              <th className="px-3 py-2">Attempts</th>
              <th className="px-3 py-2">Sent or next try</th>
              <th className="px-3 py-2">Last error</th>
            </tr>
          </thead>
          <tbody>
            {messages.map((m) => {
              const s = STATES.find((x) => x.key === m.state)!;
              return (
                <tr key={m.id} className="border-b border-rule/60 align-top last:border-0" data-state={m.state}>
                  <td className="px-3 py-2 whitespace-nowrap tabular-nums">{formatWhen(m.createdAt)}</td>
                  <td className="px-3 py-2">
                    <p className="font-medium">
                      {m.revisionId ? <Link href={`/revisions/${m.revisionId}`} className="hover:underline">{m.subject}</Link> : m.subject}
                    </p>
                    <p className="text-ink-soft">{m.recipients.join(", ") || "no recipients"}</p>
                  </td>
                  <td className={`px-3 py-2 font-semibold ${s.tone}`}>{s.label}</td>
                  <td className="px-3 py-2 tabular-nums">{m.attempts}</td>
                  <td className="px-3 py-2 whitespace-nowrap tabular-nums">{m.sentAt ? formatWhen(m.sentAt) : m.nextAttemptAt ? `next ${formatWhen(m.nextAttemptAt)}` : "—"}</td>
                  <td className="max-w-xs px-3 py-2 break-words text-bad">{m.lastError ?? ""}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
        {messages.length === 0 && <p className="p-4 text-ink-soft">No mail {query.state ? "in this state" : "yet"}.</p>}
      </div>
      <nav aria-label="Pages" className="flex items-center gap-2 text-sm">
        <span className="text-ink-soft tabular-nums">
          Page {page} of {pages}
        </span>
        {page > 1 && <Link href={link({ page: String(page - 1) })} className="rounded-md border border-rule bg-panel px-3 py-2">Newer</Link>}
        {page < pages && <Link href={link({ page: String(page + 1) })} className="rounded-md border border-rule bg-panel px-3 py-2">Older</Link>}
      </nav>
    </div>
  );
}
