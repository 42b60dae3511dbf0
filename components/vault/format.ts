/** Plain formatting shared by server and client components (no React, no Node). */

const num = new Intl.NumberFormat("en", { maximumFractionDigits: 3 });
const int = new Intl.NumberFormat("en", { maximumFractionDigits: 0 });

export const formatNumber = (n: number | null | undefined, digits = 3): string =>
  n === null || n === undefined ? "—" : digits === 3 ? num.format(n) : n.toLocaleString("en", { maximumFractionDigits: digits });

export const formatInt = (n: number | null | undefined): string => (n === null || n === undefined ? "—" : int.format(n));

/** Seconds as h:mm:ss (or m:ss under an hour); "—" when unknown. */
export function formatDuration(seconds: number | null | undefined): string {
  if (seconds === null || seconds === undefined || !Number.isFinite(seconds)) return "—";
  const s = Math.round(seconds);
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const r = s % 60;
  const mm = h > 0 ? String(m).padStart(2, "0") : String(m);
  return `${h > 0 ? `${h}:` : ""}${mm}:${String(r).padStart(2, "0")}`;
}

export function formatBytes(n: number): string {
  if (n < 1024) return `${n} B`;
  if (n < 1024 * 1024) return `${(n / 1024).toFixed(1)} KiB`;
  return `${(n / 1024 / 1024).toFixed(1)} MiB`;
}

/** An ISO time as "2026-05-13 14:02 UTC": the same text on the server and in the browser. */
export function formatWhen(iso: string | null | undefined): string {
  if (!iso) return "—";
  return `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC`;
}

/** The first characters of a SHA-256, for lists (the whole hash is shown where it is signed). */
export const shortSha = (sha: string) => sha.slice(0, 12);

export const plural = (n: number, one: string, many = `${one}s`) => `${formatInt(n)} ${n === 1 ? one : many}`;

/** Bounds of one axis as "min … max", or "—". */
export function formatRange(min: number | null | undefined, max: number | null | undefined): string {
  if (min === null || min === undefined || max === null || max === undefined) return "—";
  return `${formatNumber(min)} … ${formatNumber(max)}`;
}
