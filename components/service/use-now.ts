"use client";

import { useEffect, useState } from "react";

/** Wall-clock time that re-renders every `everyMs`, for "in place for …" and overdue marks. */
export function useNow(everyMs = 30_000): number {
  const [nowMs, setNowMs] = useState(() => Date.now());
  useEffect(() => {
    const t = setInterval(() => setNowMs(Date.now()), everyMs);
    return () => clearInterval(t);
  }, [everyMs]);
  return nowMs;
}
