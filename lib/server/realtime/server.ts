import type { Server as HttpServer } from "node:http";
import { Server, type Socket } from "socket.io";
import type { Db } from "@/db/client";
import type { SessionViewer } from "@/db/queries/sessions";
import { canSeeSite, visibleSiteIds } from "@/db/queries/sites";
import { sessionTokenFrom } from "@/lib/auth/session";
import { isCrossSite, provenanceOf } from "../origin";
import {
  boardRoom,
  joinSiteSchema,
  siteRoom,
  type ClientToServerEvents,
  type ServerToClientEvents,
} from "@/lib/realtime/events";

import { viewerFromSessionToken } from "../sessions";

interface SocketData {
  viewer: SessionViewer;
}

export type RealtimeServer = Server<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;
type LiveSocket = Socket<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

/** How often every open socket's viewer is read again when nothing else asks sooner. */
export const DEFAULT_RECHECK_MS = 5000;

function readCookie(header: string | undefined, name: string): string | undefined {
  if (!header) return undefined;
  for (const part of header.split(";")) {
    const eq = part.indexOf("=");
    if (eq > 0 && part.slice(0, eq).trim() === name) return decodeURIComponent(part.slice(eq + 1).trim());
  }
  return undefined;
}

/** The viewer behind a browser's session cookie (a live session of an enabled account), or null. */
export async function viewerFromCookie(
  db: Db,
  cookieHeader: string | undefined,
  secret: string,
): Promise<SessionViewer | null> {
  const token = sessionTokenFrom((name) => readCookie(cookieHeader, name));
  return token ? viewerFromSessionToken(db, token, secret) : null;
}

/** Closes the sockets whose viewer matches; returns how many. */
function disconnectWhere(io: RealtimeServer, match: (viewer: SessionViewer) => boolean): number {
  let n = 0;
  for (const socket of io.of("/").sockets.values()) {
    if (!match(socket.data.viewer)) continue;
    socket.disconnect(true);
    n++;
  }
  return n;
}

export const disconnectUserSockets = (io: RealtimeServer, userId: string) =>
  disconnectWhere(io, (v) => v.userId === userId);

export const disconnectSessionSockets = (io: RealtimeServer, sessionId: string) =>
  disconnectWhere(io, (v) => v.sessionId === sessionId);

export function createRealtimeServer(
  httpServer: HttpServer,
  deps: { db: Db; secret: string; allowedOrigins: ReadonlySet<string>; recheckMs?: number },
): RealtimeServer {
  const io: RealtimeServer = new Server(httpServer, {
    // Other upgrade requests (Next's dev reload socket) are passed on, not cut off.
    destroyUpgrade: false,
    serveClient: false,
  });

  io.use(async (socket, next) => {
    // The handshake carries the session cookie: only Liftline's own pages may open it (OWASP ASVS 5.0 §4.4.2).
    if (isCrossSite(provenanceOf(socket.handshake.headers), deps.allowedOrigins)) return next(new Error("forbidden"));
    const viewer = await viewerFromCookie(deps.db, socket.handshake.headers.cookie, deps.secret);
    if (!viewer) return next(new Error("unauthorized"));
    socket.data.viewer = viewer;
    next();
  });

  /**
   * The socket's viewer read again: a disabled account, an ended session, or a new role or
   * organization is null, and the caller closes the socket (its rooms were joined under the old scope).
   */
  async function currentViewer(socket: LiveSocket): Promise<SessionViewer | null> {
    const before = socket.data.viewer;
    const now = await viewerFromCookie(deps.db, socket.handshake.headers.cookie, deps.secret).catch(() => null);
    if (!now || now.role !== before.role || now.organizationId !== before.organizationId) return null;
    socket.data.viewer = now;
    return now;
  }

  const refused = { error: { code: "unauthorized", message: "The session has ended. Sign in again." } };

  // Sockets are re-read on every join and, in between, on this timer, so one whose account was
  // disabled elsewhere (another process, a database edit) stops receiving within a period.
  const recheck = setInterval(() => {
    for (const socket of io.of("/").sockets.values())
      void currentViewer(socket).then((viewer) => {
        if (!viewer) socket.disconnect(true);
      });
  }, deps.recheckMs ?? DEFAULT_RECHECK_MS);
  recheck.unref();
  httpServer.once("close", () => clearInterval(recheck));

  io.on("connection", (socket) => {
    socket.on("site:join", async (payload, ack) => {
      const parsed = joinSiteSchema.safeParse(payload);
      if (typeof ack !== "function") return;
      if (!parsed.success) return ack({ error: { code: "bad_request", message: "siteId is required" } });
      const viewer = await currentViewer(socket);
      if (!viewer) {
        ack(refused);
        return void socket.disconnect(true);
      }
      // Same answer for a site that does not exist and one the viewer may not see.
      if (!canSeeSite(deps.db, viewer, parsed.data.siteId))
        return ack({ error: { code: "not_found", message: "No such site." } });
      void socket.join(siteRoom(parsed.data.siteId));
      ack({ data: { siteId: parsed.data.siteId } });
    });
    socket.on("site:leave", (payload, ack) => {
      const parsed = joinSiteSchema.safeParse(payload);
      if (parsed.success) void socket.leave(siteRoom(parsed.data.siteId));
      if (typeof ack === "function")
        ack(
          parsed.success
            ? { data: { siteId: parsed.data.siteId } }
            : { error: { code: "bad_request", message: "siteId is required" } },
        );
    });
    socket.on("board:join", async (ack) => {
      const viewer = await currentViewer(socket);
      if (!viewer) {
        if (typeof ack === "function") ack(refused);
        return void socket.disconnect(true);
      }
      const siteIds = visibleSiteIds(deps.db, viewer);
      void socket.join(siteIds.map(boardRoom));
      if (typeof ack === "function") ack({ data: { siteIds } });
    });
    socket.on("board:leave", (ack) => {
      const rooms = [...socket.rooms].filter((r) => r.startsWith(boardRoom("")));
      for (const room of rooms) void socket.leave(room);
      if (typeof ack === "function") ack({ data: { siteIds: rooms.map((r) => r.slice(boardRoom("").length)) } });
    });
  });

  return io;
}
