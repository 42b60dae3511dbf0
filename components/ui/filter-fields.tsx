import Link from "next/link";
import type { InputHTMLAttributes, ReactNode } from "react";

/** The look of a field in a list's filter form. */
export const filterField = "w-full rounded-md border border-rule bg-white px-2 py-2 text-sm";

/** A labelled select of a GET filter form; the first option, "", means no filter. */
export function FilterSelect({
  label,
  name,
  value,
  any,
  options,
}: {
  label: string;
  name: string;
  value: string | number | undefined;
  /** The label of "no filter", e.g. "Any machine". */
  any: string;
  options: { value: string | number; label: string }[];
}) {
  return (
    <label className="text-sm">
      <span className="mb-1 block font-medium">{label}</span>
      <select name={name} defaultValue={value === undefined ? "" : String(value)} className={filterField}>
        <option value="">{any}</option>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </label>
  );
}

/** A labelled box of a GET filter form (text, number, date…); blank means no filter. */
export function FilterInput({
  label,
  name,
  value,
  className = "",
  ...props
}: { label: string; name: string; value: string | number | undefined; className?: string } & Omit<InputHTMLAttributes<HTMLInputElement>, "value" | "defaultValue">) {
  return (
    <label className={`text-sm ${className}`}>
      <span className="mb-1 block font-medium">{label}</span>
      <input name={name} defaultValue={value === undefined ? "" : String(value)} className={filterField} {...props} />
    </label>
  );
}

/** Apply and Clear (back to `clearHref`, no filters) at the foot of a filter form, with an optional note. */
export function FilterActions({ clearHref, className = "", children }: { clearHref: string; className?: string; children?: ReactNode }) {
  return (
    <div className={`flex items-end gap-2 ${className}`}>
      <button type="submit" className="min-h-10 rounded-md bg-brand px-4 py-2 text-sm font-semibold text-white hover:bg-brand-strong">
        Apply filters
      </button>
      <Link href={clearHref} className="min-h-10 rounded-md border border-rule px-4 py-2 text-sm">
        Clear
      </Link>
      {children}
    </div>
  );
}

/** The alert above a filtered list when some of the address's filters were not understood (`parseSearch`'s `ignored`). */
export function IgnoredFilters({ ignored }: { ignored: readonly string[] }) {
  if (ignored.length === 0) return null;
  return (
    <p role="alert" className="rounded-md bg-bad/10 px-3 py-2 text-sm text-bad">
      Some filters in the address were not understood and were left out: {ignored.join(", ")}.
    </p>
  );
}
