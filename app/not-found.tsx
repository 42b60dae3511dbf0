import Link from "next/link";

export default function NotFound() {
  return (
    <main className="mx-auto max-w-lg px-6 py-16">
      <h1 className="text-2xl font-semibold">Not found</h1>
      <p className="mt-2 text-ink-soft">There is nothing at this address.</p>
      <Link href="/" className="mt-4 inline-block text-brand hover:underline">Back to the overview</Link>
    </main>
  );
}
