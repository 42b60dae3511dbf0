import { requireRecordPage } from "@/lib/auth/record-guard";

/** Decides 403/404 before the loading skeleton streams (see requireRecordPage). */
export default async function ProgramLayout({ children, params }: { children: React.ReactNode; params: Promise<{ id: string }> }) {
  await requireRecordPage("program", (await params).id);
  return children;
}
