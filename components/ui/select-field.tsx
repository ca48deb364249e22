import type { SelectHTMLAttributes } from "react";

/** A labelled select with its validation message tied to it for screen readers, like Field. */
export function SelectField({
  id,
  label,
  error,
  children,
  ...props
}: SelectHTMLAttributes<HTMLSelectElement> & { id: string; label: string; error?: string }) {
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-sm font-semibold">
        {label}
      </label>
      <select
        id={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        className="min-h-11 rounded border border-line bg-panel px-3 text-base aria-invalid:border-alarm"
        {...props}
      >
        {children}
      </select>
      {error ? (
        <p id={`${id}-error`} className="text-sm text-alarm">
          {error}
        </p>
      ) : null}
    </div>
  );
}
