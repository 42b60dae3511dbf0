import { requireRecordPage } from "@/lib/auth/record-guard";

/** Decides 403/404 before the loading skeleton streams (see requireRecordPage). */
export default async function RevisionLayout({ children, params }: { children: React.ReactNode; params: Promise<{ id: string }> }) {
  await requireRecordPage("revision", (await params).id);
  return children;
}
