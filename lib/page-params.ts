/** A page's numeric id segment, or null (the page then answers not found). Same range as the JSON routes' ids. */
export function pageId(raw: string): number | null {
  if (!/^[1-9]\d{0,9}$/.test(raw)) return null;
  const n = Number(raw);
  return n <= 2_147_483_647 ? n : null;
}
