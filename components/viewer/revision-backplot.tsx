import { getBackplotSetup, prewarmToolpath } from "@/lib/dal/toolpath";
import { listWorkOffsets } from "@/lib/dal/work-offsets";
import { Backplot } from "./backplot";

/**
 * The revision page's 3D backplot (a server component): reads the machine, the engine's options and the other
 * revisions of the program, and hands them to the client-side viewer.
 */
export async function RevisionBackplot({ revisionId, className }: { revisionId: number; className?: string }) {
  const setup = await getBackplotSetup(revisionId);
  if (!setup) return null;
  await prewarmToolpath(revisionId);
  const offsets = await listWorkOffsets(setup.machine.id);
  return (
    <Backplot
      revisionId={revisionId}
      revisionNumber={setup.revisionNumber}
      options={setup.options}
      machine={setup.machine}
      enteredOffsets={offsets.offsets.map(({ code, x, y, z }) => ({ code, x, y, z }))}
      otherRevisions={setup.otherRevisions}
      className={className}
    />
  );
}
