"use client";

import { useEffect } from "react";

// Registers the service worker (public/sw.js) for pushes and the offline board.
export function ServiceWorkerRegistration() {
  useEffect(() => {
    if (!("serviceWorker" in navigator)) return;
    navigator.serviceWorker.register("/sw.js", { scope: "/" }).catch(() => undefined);
  }, []);
  return null;
}

export const SNAPSHOT_CACHE = "liftline-board";
/** Set once signing out began: this page saves no more snapshots before it navigates away. */
let signingOut = false;
const SNAPSHOT_KEY = "/__liftline/board-snapshot";

export interface BoardSnapshotSite {
  name: string;
  data: string;
  alarm: string | null;
}

/** Keeps the board as last seen, for the offline page; only names, data status and the worst alarm's title. */
export async function saveBoardSnapshot(sites: BoardSnapshotSite[]): Promise<void> {
  if (typeof caches === "undefined" || signingOut) return;
  const cache = await caches.open(SNAPSHOT_CACHE);
  // A board update that lands while signing out must not write back what was just deleted.
  if (signingOut) return;
  await cache.put(
    SNAPSHOT_KEY,
    new Response(JSON.stringify({ savedAt: Date.now(), sites }), { headers: { "content-type": "application/json" } }),
  );
}

/** Signing out deletes what the device kept, so a signed-out person cannot read it afterwards. */
export async function clearDeviceData(): Promise<void> {
  signingOut = true;
  if (typeof caches !== "undefined") await caches.delete(SNAPSHOT_CACHE);
  navigator.serviceWorker?.controller?.postMessage({ type: "signed-out" });
}
