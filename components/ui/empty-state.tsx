import type { ReactNode } from "react";

/** A dashed panel saying there is nothing here yet, and what to do about it. */
export function EmptyState({ title, children, testId }: { title: string; children?: ReactNode; testId?: string }) {
  return (
    <div className="rounded-lg border border-dashed border-rule bg-panel p-8 text-center" data-testid={testId}>
      <p className="font-medium">{title}</p>
      {children && <div className="mt-1 text-sm text-ink-soft">{children}</div>}
    </div>
  );
}
