export function Forbidden({ what }: { what: string }) {
  return (
    <section className="rounded-lg border border-rule bg-panel p-6">
      <h1 className="text-xl font-semibold">Not for your role</h1>
      <p className="mt-2 text-ink-soft">Your role does not allow {what}. Ask an admin if you need it.</p>
    </section>
  );
}
