import { requireRecordPage } from "@/lib/auth/record-guard";

/** Decides 403/404 before the loading skeleton streams (see requireRecordPage). */
export default async function CompareLayout({ children, params }: { children: React.ReactNode; params: Promise<{ other: string }> }) {
  await requireRecordPage("revision", (await params).other);
  return children;
}
