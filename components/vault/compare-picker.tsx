"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";

/** Picks any two revisions of a program and opens their comparison (older on the left). */
export function ComparePicker({ revisions }: { revisions: { id: number; number: number; label: string }[] }) {
  const router = useRouter();
  const newest = revisions[0];
  const previous = revisions[1];
  const [a, setA] = useState(String(previous?.id ?? ""));
  const [b, setB] = useState(String(newest?.id ?? ""));
  if (revisions.length < 2) return <p className="text-sm text-ink-soft">Comparing needs two revisions.</p>;
  const field = "rounded-md border border-rule bg-white px-2 py-2 text-sm";
  return (
    <form
      className="flex flex-wrap items-end gap-3"
      aria-label="Compare two revisions"
      onSubmit={(e) => {
        e.preventDefault();
        if (a && b && a !== b) router.push(`/revisions/${a}/compare/${b}`);
      }}
    >
      <div className="text-sm">
        <label htmlFor="compare-a" className="mb-1 block font-medium">
          From
        </label>
        <select id="compare-a" value={a} onChange={(e) => setA(e.target.value)} className={field} name="a">
          {revisions.map((r) => (
            <option key={r.id} value={r.id}>
              {r.label}
            </option>
          ))}
        </select>
      </div>
      <div className="text-sm">
        <label htmlFor="compare-b" className="mb-1 block font-medium">
          To
        </label>
        <select id="compare-b" value={b} onChange={(e) => setB(e.target.value)} className={field} name="b">
          {revisions.map((r) => (
            <option key={r.id} value={r.id}>
              {r.label}
            </option>
          ))}
        </select>
      </div>
      <button type="submit" disabled={a === b} className="min-h-10 rounded-md border border-rule bg-white px-4 py-2 text-sm font-semibold hover:bg-paper disabled:opacity-60">
        Compare
      </button>
      {a === b && <p className="text-sm text-ink-soft">Pick two different revisions.</p>}
    </form>
  );
}
