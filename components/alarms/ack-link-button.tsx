"use client";

import { useState } from "react";
import { Button } from "@/components/ui/button";

export function AckLinkButton({ token }: { token: string }) {
  const [result, setResult] = useState<{ ok: boolean; message: string } | null>(null);
  const [busy, setBusy] = useState(false);

  async function acknowledge() {
    setBusy(true);
    const res = await fetch(`/api/ack-links/${token}`, { method: "POST" });
    const body = await res.json().catch(() => null);
    setResult(
      res.ok
        ? { ok: true, message: "Acknowledged. Thank you." }
        : { ok: false, message: body?.error?.message ?? "Could not acknowledge." },
    );
    setBusy(false);
  }

  if (result) {
    return (
      <p
        role="status"
        className={`rounded border px-3 py-2 ${result.ok ? "border-line bg-panel" : "border-alarm/40 bg-alarm/5 text-alarm"}`}
      >
        {result.message}
      </p>
    );
  }
  return (
    <Button onClick={acknowledge} disabled={busy} className="w-full">
      {busy ? "Acknowledging…" : "Acknowledge this alarm"}
    </Button>
  );
}
