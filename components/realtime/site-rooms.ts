import type { Socket } from "socket.io-client";
import type { ClientToServerEvents, ServerToClientEvents, SiteStatus, SiteValues } from "@/lib/realtime/events";

export type LiveSocket = Socket<ServerToClientEvents, ClientToServerEvents>;
export type RoomSocket = Pick<LiveSocket, "active" | "connected" | "connect" | "on" | "off" | "emit">;

export type SiteEventTarget = { siteId: string } | "board";
export type SiteEventHandlers = {
  onStatus?: (s: SiteStatus) => void;
  onValues?: (v: SiteValues) => void;
  onReconnect?: () => void;
};

interface Subscriber {
  /** null: the board, every site the viewer may see (status only). */
  siteId: string | null;
  handlers: { readonly current: SiteEventHandlers };
}

export interface SiteRooms {
  /**
   * Routes this socket's events to the panels and joins the rooms they want, now and after
   * every reconnect. The socket connects when the first panel wants a room, so a page
   * without live panels opens no connection.
   */
  attach(socket: RoomSocket): () => void;
  /** A panel's interest in a site (or the board); returns its release. */
  subscribe(target: SiteEventTarget, handlers: { readonly current: SiteEventHandlers }): () => void;
}

const BOARD = "board";
const keyOf = (siteId: string | null) => (siteId === null ? BOARD : `site:${siteId}`);

/**
 * The rooms one browser tab's socket is in, counted per panel: two panels on the same site
 * share the join, and the room is left only when the last of them goes.
 */
export function createSiteRooms(): SiteRooms {
  const subscribers = new Set<Subscriber>();
  const counts = new Map<string, { siteId: string | null; n: number }>();
  let socket: RoomSocket | null = null;

  const join = (siteId: string | null) => {
    if (!socket?.connected) return;
    if (siteId === null) socket.emit("board:join", () => {});
    else socket.emit("site:join", { siteId }, () => {});
  };
  const connectIfWanted = () => {
    if (socket && !socket.active && counts.size > 0) socket.connect();
  };
  const leave = (siteId: string | null) => {
    if (!socket?.connected) return;
    if (siteId === null) socket.emit("board:leave", () => {});
    else socket.emit("site:leave", { siteId }, () => {});
  };

  return {
    attach(s) {
      socket = s;
      let connectedOnce = false;
      const onConnect = () => {
        // The server forgets a socket's rooms when it drops, so each connection joins afresh.
        for (const { siteId } of counts.values()) join(siteId);
        // Events missed while offline are not replayed: the panels refetch.
        if (connectedOnce) for (const sub of [...subscribers]) sub.handlers.current.onReconnect?.();
        connectedOnce = true;
      };
      const onStatus = (status: SiteStatus) => {
        for (const sub of [...subscribers])
          if (sub.siteId === null || sub.siteId === status.siteId) sub.handlers.current.onStatus?.(status);
      };
      const onValues = (values: SiteValues) => {
        for (const sub of [...subscribers]) if (sub.siteId === values.siteId) sub.handlers.current.onValues?.(values);
      };
      // The server closes a socket whose viewer changed (new role or organization) or ended: one
      // new connection picks up the new scope, and a refused handshake (signed out) leaves it closed.
      const onDisconnect = (reason: string) => {
        if (reason === "io server disconnect" && counts.size > 0) s.connect();
      };
      s.on("connect", onConnect);
      s.on("disconnect", onDisconnect);
      s.on("site:status", onStatus);
      s.on("site:values", onValues);
      if (s.connected) onConnect();
      else connectIfWanted();
      return () => {
        s.off("connect", onConnect);
        s.off("disconnect", onDisconnect);
        s.off("site:status", onStatus);
        s.off("site:values", onValues);
        if (socket === s) socket = null;
      };
    },

    subscribe(target, handlers) {
      const sub: Subscriber = { siteId: target === "board" ? null : target.siteId, handlers };
      subscribers.add(sub);
      const key = keyOf(sub.siteId);
      const entry = counts.get(key);
      if (entry) entry.n++;
      else {
        counts.set(key, { siteId: sub.siteId, n: 1 });
        join(sub.siteId);
        connectIfWanted();
      }
      let released = false;
      return () => {
        if (released) return;
        released = true;
        subscribers.delete(sub);
        const current = counts.get(key)!;
        if (--current.n > 0) return;
        counts.delete(key);
        leave(sub.siteId);
      };
    },
  };
}
