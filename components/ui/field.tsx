import type { InputHTMLAttributes } from "react";

/** A labelled input with its validation message tied to it for screen readers. */
export function Field({
  label,
  error,
  id,
  ...props
}: InputHTMLAttributes<HTMLInputElement> & { label: string; id: string; error?: string }) {
  const errorId = `${id}-error`;
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="text-sm font-semibold">
        {label}
      </label>
      <input
        id={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? errorId : undefined}
        className="min-h-11 rounded border border-line bg-panel px-3 text-base aria-invalid:border-alarm"
        {...props}
      />
      {error ? (
        <p id={errorId} className="text-sm text-alarm">
          {error}
        </p>
      ) : null}
    </div>
  );
}
