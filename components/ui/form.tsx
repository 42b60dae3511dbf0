"use client";

import { useFormStatus } from "react-dom";
import type { InputHTMLAttributes, ReactNode, SelectHTMLAttributes, TextareaHTMLAttributes } from "react";

type Errors = Record<string, string[] | undefined> | undefined;

function errorId(name: string) {
  return `${name}-error`;
}

/** The field's messages, announced as they appear. */
export function FieldError({ name, errors }: { name: string; errors: Errors }) {
  const list = errors?.[name];
  return (
    <div id={errorId(name)} aria-live="polite" className="min-h-5 text-sm text-bad">
      {list?.map((m) => <p key={m}>{m}</p>)}
    </div>
  );
}

const inputClass =
  "block w-full rounded-md border border-rule bg-white px-3 py-2.5 text-base text-ink shadow-inner aria-[invalid=true]:border-bad disabled:opacity-60";

export function TextField({
  label,
  name,
  errors,
  hint,
  ...props
}: { label: string; name: string; errors?: Errors; hint?: string } & InputHTMLAttributes<HTMLInputElement>) {
  const invalid = Boolean(errors?.[name]?.length);
  return (
    <div className="space-y-1">
      <label htmlFor={name} className="block text-sm font-medium">
        {label}
      </label>
      <input
        id={name}
        name={name}
        aria-invalid={invalid}
        aria-describedby={errorId(name)}
        className={inputClass}
        {...props}
      />
      {hint && <p className="text-xs text-ink-soft">{hint}</p>}
      <FieldError name={name} errors={errors} />
    </div>
  );
}

export function TextArea({
  label,
  name,
  errors,
  ...props
}: { label: string; name: string; errors?: Errors } & TextareaHTMLAttributes<HTMLTextAreaElement>) {
  const invalid = Boolean(errors?.[name]?.length);
  return (
    <div className="space-y-1">
      <label htmlFor={name} className="block text-sm font-medium">
        {label}
      </label>
      <textarea id={name} name={name} aria-invalid={invalid} aria-describedby={errorId(name)} className={inputClass} {...props} />
      <FieldError name={name} errors={errors} />
    </div>
  );
}

export function SelectField({
  label,
  name,
  errors,
  children,
  ...props
}: { label: string; name: string; errors?: Errors; children: ReactNode } & SelectHTMLAttributes<HTMLSelectElement>) {
  const invalid = Boolean(errors?.[name]?.length);
  return (
    <div className="space-y-1">
      <label htmlFor={name} className="block text-sm font-medium">
        {label}
      </label>
      <select id={name} name={name} aria-invalid={invalid} aria-describedby={errorId(name)} className={inputClass} {...props}>
        {children}
      </select>
      <FieldError name={name} errors={errors} />
    </div>
  );
}

export function CheckboxField({
  label,
  name,
  errors,
  ...props
}: { label: string; name: string; errors?: Errors } & InputHTMLAttributes<HTMLInputElement>) {
  return (
    <div className="space-y-1">
      <label className="flex items-center gap-3 text-sm font-medium">
        <input type="checkbox" name={name} aria-describedby={errorId(name)} className="size-5 accent-brand" {...props} />
        {label}
      </label>
      <FieldError name={name} errors={errors} />
    </div>
  );
}

/** A submit button that is disabled while its form is pending. */
export function SubmitButton({ children, variant = "primary" }: { children: ReactNode; variant?: "primary" | "plain" | "danger" }) {
  const { pending } = useFormStatus();
  const styles = {
    primary: "bg-brand text-white hover:bg-brand-strong",
    plain: "border border-rule bg-white text-ink hover:bg-paper",
    danger: "bg-bad text-white hover:opacity-90",
  }[variant];
  return (
    <button
      type="submit"
      disabled={pending}
      aria-disabled={pending}
      className={`inline-flex min-h-11 items-center justify-center rounded-md px-4 py-2 text-sm font-semibold disabled:opacity-60 ${styles}`}
    >
      {pending ? "Working…" : children}
    </button>
  );
}

/** The form-level message: an alert on failure, a status note on success. */
export function FormMessage({ state }: { state: { status: number; message?: string } }) {
  if (!state.message) return <div aria-live="polite" />;
  const ok = state.status >= 200 && state.status < 300;
  return (
    <div
      role={ok ? "status" : "alert"}
      className={`rounded-md px-3 py-2 text-sm ${ok ? "bg-ok/10 text-ok" : "bg-bad/10 text-bad"}`}
    >
      {state.message}
    </div>
  );
}
