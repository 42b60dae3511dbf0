/**
 * The pre-run checklist's rules, shared by the run page (its live count), the data layer (what the server requires)
 * and the tests. Pure: no imports from next, react or db.
 */

/** What an operator confirms before cycle start. */
export interface RunChecks {
  /** The program on the control is this revision (number, first lines, size compared). */
  identity: boolean;
  /** Work offset codes set at the control and checked. */
  offsets: string[];
  /** Tool numbers loaded with their length offsets measured. */
  tools: number[];
  dryRun: boolean;
}

/** What the revision needs confirmed: every work offset it calls and every tool it uses. */
export interface RequiredChecks {
  offsets: string[];
  tools: number[];
}

export interface CheckGaps {
  identity: boolean;
  offsets: string[];
  tools: number[];
  dryRun: boolean;
  /** Ticked but not called by the program (a form of another revision, a typo in an API call). */
  strayOffsets: string[];
  strayTools: number[];
}

/** Which checks are still missing, and which were given that the program does not call. */
export function checkGaps(required: RequiredChecks, given: RunChecks): CheckGaps {
  const offsets = new Set(given.offsets);
  const tools = new Set(given.tools);
  const needOffsets = new Set(required.offsets);
  const needTools = new Set(required.tools);
  return {
    identity: !given.identity,
    offsets: required.offsets.filter((c) => !offsets.has(c)),
    tools: required.tools.filter((t) => !tools.has(t)),
    dryRun: !given.dryRun,
    strayOffsets: [...offsets].filter((c) => !needOffsets.has(c)),
    strayTools: [...tools].filter((t) => !needTools.has(t)),
  };
}

export const hasGaps = (g: CheckGaps) =>
  g.identity || g.dryRun || g.offsets.length > 0 || g.tools.length > 0 || g.strayOffsets.length > 0 || g.strayTools.length > 0;

/** How many boxes the checklist has: identity, each offset, each tool, dry run. */
export const checkCount = (required: RequiredChecks) => 2 + required.offsets.length + required.tools.length;

/** The gaps in words, one message per group, keyed by the form's field names. */
export function gapMessages(g: CheckGaps): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  if (g.identity) out.identity = ["Compare the program on the control with this revision, then tick it."];
  if (g.offsets.length > 0) out.offsets = [`Not ticked: ${g.offsets.join(", ")}. Tick each once it is set at the control and checked.`];
  if (g.strayOffsets.length > 0) (out.offsets ??= []).push(`Not called by this program: ${g.strayOffsets.join(", ")}.`);
  if (g.tools.length > 0) out.tools = [`Not ticked: ${g.tools.map((t) => `T${t}`).join(", ")}. Tick each once it is loaded with its length offset measured.`];
  if (g.strayTools.length > 0) (out.tools ??= []).push(`Not used by this program: ${g.strayTools.map((t) => `T${t}`).join(", ")}.`);
  if (g.dryRun) out.dryRun = ["Do the dry run first, then tick it."];
  return out;
}

/**
 * Tools in the order they go into the spindle: tools the program uses without a change first (already in the
 * spindle), then by their first load in `sequence` (the engine's tool numbers per M6, in order).
 */
export function inLoadOrder<T extends { number: number; firstLine: number }>(tools: T[], sequence: number[]): T[] {
  const firstLoad = new Map<number, number>();
  sequence.forEach((n, i) => {
    if (!firstLoad.has(n)) firstLoad.set(n, i);
  });
  const key = (t: T) => firstLoad.get(t.number) ?? -1;
  return [...tools].sort((a, b) => key(a) - key(b) || a.firstLine - b.firstLine || a.number - b.number);
}

/** A SHA-256 in groups of four hex digits, so two can be compared group by group. */
export function shaGroups(sha: string): string[] {
  return sha.match(/.{1,4}/g) ?? [];
}

/** The number in a program number such as "O0412" or "1001" (letters before it ignored), or null. */
export function programNumberValue(programNumber: string): number | null {
  const m = /^[A-Za-z]*0*(\d{1,9})$/.exec(programNumber.trim());
  return m ? Number(m[1]) : null;
}
