import type { Metadata } from "next";
import Link from "next/link";
import { requirePagePermission } from "@/lib/auth/page-guard";
import { auditFilterSchema, listAuditEvents } from "@/lib/dal/audit";

export const metadata: Metadata = { title: "Audit record" };

type Search = Record<string, string | string[] | undefined>;

const FILTERS = [
  { name: "actor", label: "Who (e-mail contains)", type: "text" },
  { name: "action", label: "Action starts with", type: "text" },
  { name: "objectType", label: "Object type", type: "text" },
  { name: "objectId", label: "Object id", type: "text" },
  { name: "from", label: "From (UTC day)", type: "date" },
  { name: "to", label: "To (UTC day)", type: "date" },
] as const;

export default async function AuditPage({ searchParams }: { searchParams: Promise<Search> }) {
  await requirePagePermission("readAudit");
  const sp = await searchParams;
  const flat = Object.fromEntries(Object.entries(sp).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]));
  const parsed = auditFilterSchema.safeParse(flat);
  const filter = parsed.success ? parsed.data : { page: 1 };
  const { rows, total, page, pageSize, counting } = await listAuditEvents(filter);
  const pages = Math.max(1, Math.ceil(total / pageSize));
  const link = (p: number) => {
    const q = new URLSearchParams();
    for (const [k, v] of Object.entries(flat)) if (v && k !== "page") q.set(k, v);
    q.set("page", String(p));
    return `/audit?${q.toString()}`;
  };
  return (
    <div className="space-y-4">
      <h1 className="text-2xl font-semibold">Audit record</h1>
      <form className="grid gap-3 rounded-lg border border-rule bg-panel p-4 sm:grid-cols-3 lg:grid-cols-6" role="search">
        {FILTERS.map((f) => (
          <label key={f.name} className="text-sm">
            <span className="mb-1 block font-medium">{f.label}</span>
            <input
              name={f.name}
              type={f.type}
              defaultValue={flat[f.name] ?? ""}
              className="w-full rounded-md border border-rule px-2 py-2"
            />
          </label>
        ))}
        <div className="flex gap-2 sm:col-span-3 lg:col-span-6">
          <button type="submit" className="rounded-md bg-brand px-4 py-2 text-sm font-semibold text-white">Filter</button>
          <Link href="/audit" className="rounded-md border border-rule px-4 py-2 text-sm">Clear</Link>
        </div>
      </form>
      {!parsed.success && (
        <p role="alert" className="rounded-md bg-bad/10 px-3 py-2 text-sm text-bad">
          Some filters were not understood and were ignored: {parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join(" ")}
        </p>
      )}
      {counting.length > 0 && (
        <section aria-label="Still being counted" className="rounded-lg border border-rule bg-panel p-4 text-sm">
          <h2 className="font-semibold">Repeats still being counted</h2>
          <p className="text-ink-soft">The first of each is in the record below; one row with the count follows when its window ends.</p>
          <ul className="mt-2 space-y-1">
            {counting.map((c) => (
              <li key={`${c.action}|${c.actorEmail}|${c.ip}|${c.windowEnd}`}>
                <span className="font-medium">{c.action}</span> by {c.actorEmail ?? "someone signed out"} from{" "}
                <span className="font-mono text-xs">{c.ip ?? "an unknown address"}</span>: {c.repeated} more, the last at{" "}
                <span className="font-mono text-xs">{c.lastAt.slice(11, 19)}</span>; counted until{" "}
                <span className="font-mono text-xs">{c.windowEnd.slice(11, 19)}</span> UTC
              </li>
            ))}
          </ul>
        </section>
      )}
      <p className="text-sm text-ink-soft">
        {total} event{total === 1 ? "" : "s"} · page {page} of {pages}
      </p>
      <div className="overflow-x-auto rounded-lg border border-rule bg-panel">
        <table className="w-full text-left text-sm">
          <thead className="border-b border-rule bg-paper text-xs uppercase tracking-wide text-ink-soft">
            <tr>
              <th className="px-3 py-2">When (UTC)</th>
              <th className="px-3 py-2">Who</th>
              <th className="px-3 py-2">Action</th>
              <th className="px-3 py-2">Object</th>
              <th className="px-3 py-2">Details</th>
              <th className="px-3 py-2">From</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.id} className="border-b border-rule align-top last:border-0">
                <td className="px-3 py-2 whitespace-nowrap font-mono text-xs">{r.at.replace("T", " ").slice(0, 19)}</td>
                <td className="px-3 py-2">{r.actorEmail ?? "—"}</td>
                <td className="px-3 py-2 font-medium">{r.action}</td>
                <td className="px-3 py-2">{r.objectType ? `${r.objectType} ${r.objectId ?? ""}` : "—"}</td>
                <td className="max-w-md px-3 py-2 font-mono text-xs break-all">{JSON.stringify(r.details)}</td>
                <td className="px-3 py-2 font-mono text-xs">{r.ip ?? ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
        {rows.length === 0 && <p className="p-4 text-ink-soft">No events match.</p>}
      </div>
      <nav aria-label="Pages" className="flex gap-2">
        {page > 1 && <Link href={link(page - 1)} className="rounded-md border border-rule bg-panel px-3 py-2 text-sm">Newer</Link>}
        {page < pages && <Link href={link(page + 1)} className="rounded-md border border-rule bg-panel px-3 py-2 text-sm">Older</Link>}
      </nav>
    </div>
  );
}
