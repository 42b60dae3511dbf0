"use client";

import Link from "next/link";
import { startTransition, useActionState, useState, type ReactNode } from "react";
import { FieldError, FormMessage, TextField } from "@/components/ui/form";
import { formatNumber, formatWhen } from "@/components/vault/format";
import { initialFormState, type FormState } from "@/lib/form-state";
import { checkCount, checkGaps, hasGaps } from "@/lib/run-checklist";
import { StepHeading } from "./step-heading";

export interface ChecklistOffset {
  code: string;
  /** Line where the program selects it; null when it moves in it without selecting it (the default). */
  firstLine: number | null;
  /** The value recorded for the machine (machine coordinates, machine units), or null. */
  value: { x: number; y: number; z: number; setAt: string; setBy: string | null } | null;
}

export interface ChecklistTool {
  number: number;
  description: string | null;
  lengthOffsets: number[];
  diameterOffsets: number[];
  lowestZ: number | null;
  loads: number;
  firstLine: number;
}

export interface RunChecklistProps {
  action: (prev: FormState, fd: FormData) => Promise<FormState>;
  sha256: string;
  /** "O2207 revision 1". */
  label: string;
  machine: { id: number; name: string; units: "mm" | "inch"; manualToolChange: boolean };
  /** The program's units (lowest Z). */
  units: "mm" | "inch";
  offsets: ChecklistOffset[];
  /** In load order. */
  tools: ChecklistTool[];
  /** Every tool change in program order (the M6 line and the tool it loads). */
  changes: { line: number; tool: number | null }[];
  /** Whether the signed-in person may sign off runs, and why not. */
  mayCheck: boolean;
  /** Step 1 (the program on the control) and step 4 (the figures and findings), rendered on the server. */
  identity: ReactNode;
  summary: ReactNode;
}

const row =
  "flex min-h-16 cursor-pointer items-start gap-4 rounded-lg border-2 bg-white p-4 has-[:disabled]:cursor-default has-[:focus-visible]:outline-3 has-[:focus-visible]:outline-brand";
const box = "mt-0.5 size-7 shrink-0 accent-ok";

/** One box of the checklist: the whole row is the touch target; green once ticked, red when a sign-off missed it. */
function CheckRow(p: {
  name: string;
  value?: string;
  checked: boolean;
  missing: boolean;
  disabled: boolean;
  onChange: (checked: boolean) => void;
  children: ReactNode;
  testId?: string;
}) {
  const tone = p.checked ? "border-ok bg-ok/5" : p.missing ? "border-bad bg-bad/5" : "border-rule";
  return (
    <label className={`${row} ${tone}`} data-testid={p.testId} data-checked={p.checked}>
      <input
        type="checkbox"
        name={p.name}
        value={p.value ?? "on"}
        checked={p.checked}
        disabled={p.disabled}
        onChange={(e) => p.onChange(e.currentTarget.checked)}
        className={`${box} focus-visible:outline-none`}
      />
      <span className="min-w-0 flex-1">{p.children}</span>
    </label>
  );
}

const hList = (xs: number[], letter: string) => (xs.length === 0 ? null : xs.map((x) => `${letter}${x}`).join(" "));

/**
 * The pre-run checklist as one form: the program identity, each work offset, each tool in load order, the figures
 * and findings, the dry run, then the signature. The server checks every box again; this page only counts them.
 */
export function RunChecklist(p: RunChecklistProps) {
  const [state, formAction, pending] = useActionState(p.action, initialFormState);
  const [identity, setIdentity] = useState(false);
  const [offsets, setOffsets] = useState<Set<string>>(new Set());
  const [tools, setTools] = useState<Set<number>>(new Set());
  const [dryRun, setDryRun] = useState(false);
  const required = { offsets: p.offsets.map((o) => o.code), tools: p.tools.map((t) => t.number) };
  const gaps = checkGaps(required, { identity, offsets: [...offsets], tools: [...tools], dryRun });
  const total = checkCount(required);
  const ticked = total - (Number(gaps.identity) + Number(gaps.dryRun) + gaps.offsets.length + gaps.tools.length);
  // After the server named missing boxes, the ones still not ticked turn red.
  const flagged = state.status === 422 && ["identity", "offsets", "tools", "dryRun"].some((k) => state.fieldErrors?.[k]);
  const toggle = <T,>(set: Set<T>, value: T, on: boolean) => {
    const next = new Set(set);
    if (on) next.add(value);
    else next.delete(value);
    return next;
  };
  const disabled = !p.mayCheck || pending;
  const errors = state.fieldErrors;

  return (
    <form
      action={formAction}
      onSubmit={(e) => {
        // Submitted from script so the ticks stay as they are when the server refuses (a form action would reset them).
        e.preventDefault();
        const fd = new FormData(e.currentTarget);
        startTransition(() => formAction(fd));
      }}
      noValidate
      aria-label="Check before cycle start"
      className="space-y-6"
    >
      <input type="hidden" name="sha256" value={p.sha256} />
      {p.offsets.map((o) => (
        <input key={o.code} type="hidden" name={`shown.${o.code}`} value={o.value?.setAt ?? ""} />
      ))}

      <section aria-labelledby="step-1" className="space-y-4 rounded-xl border border-rule bg-panel p-5">
        {p.identity}
        <CheckRow name="identity" checked={identity} missing={flagged && gaps.identity} disabled={disabled} onChange={setIdentity} testId="check-identity">
          <span className="block text-lg font-semibold">The program on the control is {p.label}</span>
          <span className="block text-sm text-ink-soft">Program number, the opening lines and the size match what is shown above.</span>
        </CheckRow>
        {errors?.identity && <FieldError name="identity" errors={errors} />}
      </section>

      <section aria-labelledby="step-2" className="space-y-4 rounded-xl border border-rule bg-panel p-5">
        <StepHeading n={2} id="step-2" title="Work offsets">
          {p.offsets.length === 0
            ? "The program calls no work offset."
            : `Set each at the control and compare it with the value recorded for ${p.machine.name} (machine coordinates, ${p.machine.units}).`}
        </StepHeading>
        {p.offsets.map((o) => (
          <CheckRow
            key={o.code}
            name="offset"
            value={o.code}
            checked={offsets.has(o.code)}
            missing={flagged && gaps.offsets.includes(o.code)}
            disabled={disabled}
            onChange={(on) => setOffsets((s) => toggle(s, o.code, on))}
            testId={`check-offset-${o.code}`}
          >
            <span className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
              <span className="text-xl font-bold">{o.code}</span>
              {o.value ? (
                <span className="font-mono text-lg tabular-nums" data-testid={`offset-value-${o.code}`}>
                  X {formatNumber(o.value.x)} · Y {formatNumber(o.value.y)} · Z {formatNumber(o.value.z)}
                </span>
              ) : (
                <span className="font-semibold text-warn" data-testid={`offset-value-${o.code}`}>
                  not recorded
                </span>
              )}
            </span>
            <span className="mt-1 block text-sm text-ink-soft">
              {o.value ? (
                <>
                  Recorded by {o.value.setBy ?? "someone no longer known"} on <span className="tabular-nums">{formatWhen(o.value.setAt)}</span>.{" "}
                </>
              ) : (
                <>
                  No value is recorded for {p.machine.name}: after setting it,{" "}
                  <Link href={`/machines/${p.machine.id}`} className="text-brand underline">
                    record it on the machine page
                  </Link>
                  .{" "}
                </>
              )}
              {o.firstLine !== null ? <>Selected on line {o.firstLine}.</> : <>Never selected: the program runs in it as the control&apos;s default.</>}
            </span>
            <span className="mt-2 block font-medium">Set at the control and checked</span>
          </CheckRow>
        ))}
        {errors?.offsets && <FieldError name="offsets" errors={errors} />}
      </section>

      <section aria-labelledby="step-3" className="space-y-4 rounded-xl border border-rule bg-panel p-5">
        <StepHeading n={3} id="step-3" title="Tools, in load order">
          {p.tools.length === 0
            ? "The program uses no tool."
            : p.machine.manualToolChange
              ? "Tools are changed by hand on this machine: insert them in this order when the program stops for each change, each with its length offset measured."
              : "Load these in the tool changer, each with its length offset measured; the program calls them in this order."}
        </StepHeading>
        {p.changes.length > 1 && (
          <ol className="flex flex-wrap items-center gap-2 text-sm" aria-label="Every tool change in order" data-testid="tool-changes">
            {p.changes.map((c, i) => (
              <li key={`${c.line}-${i}`} className="flex items-center gap-2">
                {i > 0 && <span aria-hidden className="text-ink-soft">→</span>}
                <span className="rounded-md border border-rule bg-paper px-2 py-1">
                  <strong className="tabular-nums">{c.tool === null ? "T?" : `T${c.tool}`}</strong>{" "}
                  <span className="text-ink-soft tabular-nums">line {c.line}</span>
                </span>
              </li>
            ))}
          </ol>
        )}
        {p.tools.map((t, i) => (
          <CheckRow
            key={t.number}
            name="tool"
            value={String(t.number)}
            checked={tools.has(t.number)}
            missing={flagged && gaps.tools.includes(t.number)}
            disabled={disabled}
            onChange={(on) => setTools((s) => toggle(s, t.number, on))}
            testId={`check-tool-${t.number}`}
          >
            <span className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
              <span className="text-sm text-ink-soft tabular-nums">{i + 1}.</span>
              <span className="text-xl font-bold tabular-nums">T{t.number}</span>
              <span className="text-lg">{t.description ?? <span className="text-ink-soft">no description in the program</span>}</span>
            </span>
            <span className="mt-1 flex flex-wrap gap-x-5 gap-y-1 text-sm">
              <span className="tabular-nums">
                Length offset <strong>{hList(t.lengthOffsets, "H") ?? <span className="text-bad">none called</span>}</strong>
              </span>
              <span className="tabular-nums">
                Diameter offset <strong>{hList(t.diameterOffsets, "D") ?? "none"}</strong>
              </span>
              <span className="tabular-nums">
                Lowest Z <strong>{t.lowestZ === null ? "—" : `${formatNumber(t.lowestZ)} ${p.units}`}</strong>
              </span>
              <span className="text-ink-soft tabular-nums">
                {t.loads === 0 ? "in the spindle from the start" : t.loads === 1 ? `loaded on line ${t.firstLine}` : `loaded ${t.loads} times, first on line ${t.firstLine}`}
              </span>
            </span>
            <span className="mt-2 block font-medium">Loaded with its length offset measured</span>
          </CheckRow>
        ))}
        {errors?.tools && <FieldError name="tools" errors={errors} />}
      </section>

      {p.summary}

      <section aria-labelledby="step-5" className="space-y-4 rounded-xl border border-rule bg-panel p-5">
        <StepHeading n={5} id="step-5" title="Dry run and sign-off" />
        <CheckRow name="dryRun" checked={dryRun} missing={flagged && gaps.dryRun} disabled={disabled} onChange={setDryRun} testId="check-dry-run">
          <span className="block text-lg font-semibold">Dry run done</span>
          <span className="block text-sm text-ink-soft">This revision ran through once at this machine the shop&apos;s safe way, and nothing looked wrong.</span>
        </CheckRow>
        {errors?.dryRun && <FieldError name="dryRun" errors={errors} />}
        {p.mayCheck ? (
          <div className="grid gap-4 sm:grid-cols-2">
            <TextField
              label="Parts planned for this run (optional)"
              name="quantity"
              type="number"
              inputMode="numeric"
              min={1}
              max={100000}
              defaultValue={state.values?.quantity ?? ""}
              errors={errors}
            />
            <TextField label="Your password, to sign" name="password" type="password" autoComplete="current-password" errors={errors} />
          </div>
        ) : (
          <p className="rounded-md bg-paper px-3 py-2 text-sm" data-testid="no-sign-off">
            Operators and leads sign off runs. You can read this checklist; the boxes are theirs to tick.
          </p>
        )}
        {errors?.sha256 && <FieldError name="sha256" errors={errors} />}
        <div className="space-y-3 border-t border-rule pt-4">
          <p role="status" aria-live="polite" className="flex items-center gap-3 text-sm" data-testid="check-count">
            <span className="h-2 w-40 overflow-hidden rounded-full bg-paper" aria-hidden>
              <span className="block h-full bg-ok" style={{ width: `${Math.round((ticked / total) * 100)}%` }} />
            </span>
            <span className="tabular-nums">
              {ticked} of {total} checks ticked
            </span>
          </p>
          {p.mayCheck && (
            <p className="text-xs text-ink-soft">
              Signing records your name, the time, the checks above with the offset values shown, and SHA-256{" "}
              <code className="break-all">{p.sha256}</code>.
            </p>
          )}
          <FormMessage state={state} />
          {p.mayCheck && (
            <button
              type="submit"
              disabled={pending}
              className={`inline-flex min-h-14 w-full items-center justify-center rounded-lg px-6 text-lg font-semibold text-white disabled:opacity-60 sm:w-auto ${hasGaps(gaps) ? "bg-brand hover:bg-brand-strong" : "bg-ok hover:opacity-90"}`}
            >
              {pending ? "Signing…" : `Sign off ${p.label}`}
            </button>
          )}
        </div>
      </section>
    </form>
  );
}
