import type { ButtonHTMLAttributes } from "react";

const variants = {
  primary: "bg-ink text-on-strong hover:bg-ink/90 disabled:bg-stale",
  secondary: "border border-line bg-panel text-ink hover:bg-surface",
  danger: "border border-alarm/40 bg-panel text-alarm hover:bg-alarm/5",
} as const;

export function Button({
  variant = "primary",
  className = "",
  ...props
}: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: keyof typeof variants }) {
  return (
    <button
      className={`inline-flex min-h-11 items-center justify-center rounded px-4 text-sm font-semibold ${variants[variant]} ${className}`}
      {...props}
    />
  );
}
