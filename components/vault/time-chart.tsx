"use client";

import { Bar, BarChart, CartesianGrid, LabelList, ResponsiveContainer, XAxis, YAxis } from "recharts";
import { formatDuration } from "./format";

export interface TimeBar {
  label: string;
  seconds: number;
}

/**
 * Estimated time per tool or per work offset as horizontal bars, each labelled with its time. The same numbers are
 * in a table for screen readers (the drawing itself is hidden from them).
 */
export function TimeChart({ title, bars, testId }: { title: string; bars: TimeBar[]; testId?: string }) {
  if (bars.length === 0) return <p className="text-sm text-ink-soft">No time to show.</p>;
  const height = Math.max(80, bars.length * 30 + 30);
  return (
    <figure className="space-y-1" data-testid={testId}>
      <figcaption className="text-sm font-semibold">{title}</figcaption>
      <div aria-hidden style={{ height }} className="text-xs">
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={bars} layout="vertical" margin={{ top: 4, right: 64, bottom: 4, left: 4 }}>
            <CartesianGrid horizontal={false} stroke="var(--color-rule)" />
            <XAxis type="number" tickFormatter={(s: number) => formatDuration(s)} stroke="var(--color-ink-soft)" fontSize={11} />
            <YAxis type="category" dataKey="label" width={64} stroke="var(--color-ink-soft)" fontSize={12} />
            <Bar dataKey="seconds" fill="var(--color-brand)" isAnimationActive={false} barSize={18}>
              <LabelList dataKey="seconds" position="right" formatter={(s: unknown) => formatDuration(Number(s))} fontSize={12} fill="var(--color-ink)" />
            </Bar>
          </BarChart>
        </ResponsiveContainer>
      </div>
      <table className="sr-only">
        <caption>{title}</caption>
        <thead>
          <tr>
            <th scope="col">Item</th>
            <th scope="col">Time (h:mm:ss)</th>
          </tr>
        </thead>
        <tbody>
          {bars.map((b) => (
            <tr key={b.label}>
              <th scope="row">{b.label}</th>
              <td>{formatDuration(b.seconds)}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </figure>
  );
}
