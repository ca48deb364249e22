import type { Server as HttpServer } from "node:http";
import { userIdFromSessionToken } from "@/lib/auth/session-token";
import { Server } from "socket.io";
import type { Db } from "@/db/client";
import { canSeeSite, visibleSiteIds } from "@/db/queries/sites";
import { getViewerById } from "@/db/queries/users";
import { SESSION_COOKIES } from "@/lib/auth/session";
import { isCrossSite, provenanceOf } from "../origin";
import type { Viewer } from "@/lib/auth/viewer";
import {
  boardRoom,
  joinSiteSchema,
  siteRoom,
  type ClientToServerEvents,
  type ServerToClientEvents,
} from "@/lib/realtime/events";

interface SocketData {
  viewer: Viewer;
}

export type RealtimeServer = Server<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

function readCookie(header: string | undefined, name: string): string | undefined {
  if (!header) return undefined;
  for (const part of header.split(";")) {
    const eq = part.indexOf("=");
    if (eq > 0 && part.slice(0, eq).trim() === name) return decodeURIComponent(part.slice(eq + 1).trim());
  }
  return undefined;
}

/** The viewer behind a browser's session cookie, or null. */
export async function viewerFromCookie(
  db: Db,
  cookieHeader: string | undefined,
  secret: string,
): Promise<Viewer | null> {
  for (const name of SESSION_COOKIES) {
    const token = readCookie(cookieHeader, name);
    if (!token) continue;
    const userId = await userIdFromSessionToken(token, secret);
    if (userId) return getViewerById(db, userId);
  }
  return null;
}

export function createRealtimeServer(
  httpServer: HttpServer,
  deps: { db: Db; secret: string; allowedOrigins: ReadonlySet<string> },
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

  io.on("connection", (socket) => {
    const { viewer } = socket.data;
    socket.on("site:join", (payload, ack) => {
      const parsed = joinSiteSchema.safeParse(payload);
      if (typeof ack !== "function") return;
      if (!parsed.success) return ack({ error: { code: "bad_request", message: "siteId is required" } });
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
    socket.on("board:join", (ack) => {
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
