import Link from "next/link";

/** A loading placeholder: a title bar and `blocks` panels of the given heights (rem). */
export function PageSkeleton({ label, blocks = [10] }: { label: string; blocks?: number[] }) {
  return (
    <div aria-busy="true" aria-label={label} className="space-y-4">
      <div className="h-8 w-72 animate-pulse rounded bg-rule" />
      {blocks.map((h, i) => (
        <div key={i} className="animate-pulse rounded-lg bg-rule/60" style={{ height: `${h}rem` }} />
      ))}
    </div>
  );
}

/** What a not-found.tsx shows: what is missing and where to go instead. */
export function MissingPanel({ what, back, backLabel, hint = "The address may be mistyped." }: { what: string; back: string; backLabel: string; hint?: string }) {
  return (
    <section className="rounded-lg border border-rule bg-panel p-6">
      <h1 className="text-xl font-semibold">{what} not found</h1>
      <p className="mt-2 text-ink-soft">{hint}</p>
      <Link href={back} className="mt-4 inline-block text-brand hover:underline">
        {backLabel}
      </Link>
    </section>
  );
}
