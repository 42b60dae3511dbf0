/** Escapes LIKE wildcards so user text matches literally. */
export const likeEscape = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/** Date -> ISO string, null kept. */
export const iso = (d: Date | null | undefined): string | null => (d ? d.toISOString() : null);
