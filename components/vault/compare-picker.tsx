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
      {(
        [
          ["a", "From", a, setA],
          ["b", "To", b, setB],
        ] as const
      ).map(([key, label, value, set]) => (
        <div key={key} className="text-sm">
          <label htmlFor={`compare-${key}`} className="mb-1 block font-medium">
            {label}
          </label>
          <select id={`compare-${key}`} value={value} onChange={(e) => set(e.target.value)} className={field} name={key}>
            {revisions.map((r) => (
              <option key={r.id} value={r.id}>
                {r.label}
              </option>
            ))}
          </select>
        </div>
      ))}
      <button type="submit" disabled={a === b} className="min-h-10 rounded-md border border-rule bg-white px-4 py-2 text-sm font-semibold hover:bg-paper disabled:opacity-60">
        Compare
      </button>
      {a === b && <p className="text-sm text-ink-soft">Pick two different revisions.</p>}
    </form>
  );
}
