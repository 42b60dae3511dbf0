"use client";

/** What an error.tsx shows: nothing was changed, try again. */
export function RouteError({ what, reset }: { what: string; reset: () => void }) {
  return (
    <section role="alert" className="rounded-lg border border-bad/40 bg-panel p-6">
      <h1 className="text-xl font-semibold">{what} could not be shown</h1>
      <p className="mt-2 text-ink-soft">Nothing was changed. Try again; if it keeps failing, tell an admin.</p>
      <button onClick={reset} className="mt-4 rounded-md bg-brand px-4 py-2 text-sm font-semibold text-white">
        Try again
      </button>
    </section>
  );
}
