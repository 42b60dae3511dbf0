import "server-only";
import { notFound } from "next/navigation";
import { recordExists, type RecordKind } from "@/lib/dal/exists";
import { pageId } from "@/lib/page-params";
import { requirePagePermission } from "./page-guard";

const PERMISSION = { machine: "readMachines", program: "readPrograms", revision: "readPrograms" } as const;

/**
 * For the layout of a record page (`[id]/layout.tsx`): signed in, allowed to read it, and the record exists, or
 * the answer is 401-redirect / 403 / 404. A layout runs before the segment's loading.tsx streams anything, so the
 * status is still the real one; the page below then reads the record itself.
 */
export async function requireRecordPage(kind: RecordKind, rawId: string): Promise<number> {
  await requirePagePermission(PERMISSION[kind]);
  const id = pageId(rawId);
  if (id === null || !(await recordExists(kind, id))) notFound();
  return id;
}
