import type { ReactNode } from "react";

/** A numbered step of the pre-run check: the number in a circle, the title, and what to do in a line below. */
export function StepHeading({ n, id, title, children }: { n: number; id: string; title: string; children?: ReactNode }) {
  return (
    <div className="flex items-start gap-4">
      <span aria-hidden className="flex size-10 shrink-0 items-center justify-center rounded-full bg-ink text-lg font-bold text-white">
        {n}
      </span>
      <div className="min-w-0">
        <h2 id={id} className="text-xl font-semibold">
          <span className="sr-only">Step {n}: </span>
          {title}
        </h2>
        {children && <p className="text-sm text-ink-soft">{children}</p>}
      </div>
    </div>
  );
}
