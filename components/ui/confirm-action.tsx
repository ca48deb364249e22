"use client";

import { useState, type ReactNode } from "react";
import { Button } from "./button";

/**
 * A destructive action behind a second step that says what will happen; inline rather than a
 * browser dialog, so it reads the same on a phone and can be tested.
 */
export function ConfirmAction({
  label,
  confirmLabel,
  children,
  onConfirm,
}: {
  label: string;
  confirmLabel: string;
  /** What will happen, in plain words. */
  children: ReactNode;
  onConfirm: () => Promise<void>;
}) {
  const [open, setOpen] = useState(false);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);
  if (!open)
    return (
      <Button variant="danger" type="button" onClick={() => setOpen(true)}>
        {label}
      </Button>
    );
  return (
    <div role="alertdialog" aria-label={label} className="rounded-lg border border-alarm/40 bg-alarm/5 p-4 text-sm">
      <div className="flex flex-col gap-2">{children}</div>
      {error ? <p className="mt-2 text-alarm">{error}</p> : null}
      <div className="mt-3 flex flex-wrap gap-2">
        <Button
          variant="danger"
          type="button"
          disabled={busy}
          onClick={async () => {
            setBusy(true);
            setError(null);
            try {
              await onConfirm();
              setOpen(false);
            } catch (err) {
              setError((err as Error).message);
            } finally {
              setBusy(false);
            }
          }}
        >
          {confirmLabel}
        </Button>
        <Button variant="secondary" type="button" onClick={() => setOpen(false)}>
          Cancel
        </Button>
      </div>
    </div>
  );
}
