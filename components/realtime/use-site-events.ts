"use client";

import { useEffect, useRef } from "react";
import type { SiteEventHandlers, SiteEventTarget } from "./site-rooms";
import { useSiteRooms } from "./socket-provider";

/**
 * Live updates for one site, or for every site the viewer may see (`"board"`), over the tab's
 * shared socket. On reconnect the caller refetches, since events missed while offline are not replayed.
 */
export function useSiteEvents(target: SiteEventTarget, handlers: SiteEventHandlers): void {
  const rooms = useSiteRooms();
  const ref = useRef(handlers);
  useEffect(() => {
    ref.current = handlers;
  });
  const siteId = target === "board" ? null : target.siteId;
  useEffect(() => rooms.subscribe(siteId === null ? "board" : { siteId }, ref), [rooms, siteId]);
}
