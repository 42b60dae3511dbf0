/** True for PostgreSQL's unique_violation, whether pg's error or Drizzle's wrapper around it. */
export function isUniqueViolation(e: unknown): boolean {
  const cause = (e as { cause?: { code?: string } } | null)?.cause;
  return (e as { code?: string } | null)?.code === "23505" || cause?.code === "23505";
}
