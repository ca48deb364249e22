"use client";

import { useEffect, useRef } from "react";
import { io, type Socket } from "socket.io-client";
import type { ClientToServerEvents, ServerToClientEvents, SiteStatus, SiteValues } from "@/lib/realtime/events";

type Handlers = { onStatus?: (s: SiteStatus) => void; onValues?: (v: SiteValues) => void; onReconnect?: () => void };

/**
 * Live updates for one site, or for every site the viewer may see (`"board"`).
 * On reconnect the caller refetches, since events missed while offline are not replayed.
 */
export function useSiteEvents(target: { siteId: string } | "board", handlers: Handlers): void {
  const ref = useRef(handlers);
  useEffect(() => {
    ref.current = handlers;
  });
  const key = target === "board" ? "board" : target.siteId;
  useEffect(() => {
    const socket: Socket<ServerToClientEvents, ClientToServerEvents> = io({ transports: ["websocket", "polling"] });
    const join = () => {
      if (key === "board") socket.emit("board:join", () => {});
      else socket.emit("site:join", { siteId: key }, () => {});
    };
    let connectedOnce = false;
    socket.on("connect", () => {
      join();
      if (connectedOnce) ref.current.onReconnect?.();
      connectedOnce = true;
    });
    socket.on("site:status", (s) => ref.current.onStatus?.(s));
    socket.on("site:values", (v) => ref.current.onValues?.(v));
    return () => {
      socket.disconnect();
    };
  }, [key]);
}
