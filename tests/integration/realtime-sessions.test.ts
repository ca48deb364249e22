import fs from "node:fs";
import { createServer, type Server as HttpServer } from "node:http";
import os from "node:os";
import path from "node:path";
import { encode } from "next-auth/jwt";
import { io as ioClient, type Socket } from "socket.io-client";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { setUserAccess } from "@/db/queries/users";
import { seedDemo, SERVICE_ORG } from "@/db/seed/demo";
import { systemViewer, type Role } from "@/lib/auth/viewer";
import {
  createRealtimeServer,
  disconnectSessionSockets,
  disconnectUserSockets,
  type RealtimeServer,
} from "@/lib/server/realtime/server";
import { setRuntime, type Runtime } from "@/lib/server/runtime";
import { endSession, startSession } from "@/lib/server/sessions";
import { changeUserAccess, disableUser } from "@/lib/server/users";

// The socket server in this process, with the periodic re-check set far away (a minute), so
// what closes a socket here is the immediate hook or the re-check on join (OWASP ASVS 5.0 §7.4.1,
// §7.4.2: a session ended or an account disabled is no longer served).
const SECRET = "a-test-secret-of-at-least-32-characters!";
const CUSTOMER = "user-org-harborview";
const SITE = "harborview-mob";
let db: Db;
let http: HttpServer;
let io: RealtimeServer;
let url: string;
const origins = new Set<string>();
const sockets: Socket[] = [];
const admin = systemViewer(SERVICE_ORG.id);

beforeAll(async () => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-rt-"));
  db = openDb(path.join(dir, "test.db"));
  migrateDb(db);
  seedDemo(db, "demo-password-1");
  http = createServer();
  io = createRealtimeServer(http, { db, secret: SECRET, allowedOrigins: origins, recheckMs: 60_000 });
  setRuntime({
    disconnectUserSockets: (userId: string) => disconnectUserSockets(io, userId),
    disconnectSessionSockets: (sessionId: string) => disconnectSessionSockets(io, sessionId),
  } as unknown as Runtime);
  await new Promise<void>((resolve) => http.listen(0, "127.0.0.1", resolve));
  url = `http://127.0.0.1:${(http.address() as { port: number }).port}`;
  origins.add(url);
});
afterAll(async () => {
  for (const s of sockets) s.disconnect();
  setRuntime(undefined);
  io.close();
  db.$client.close();
});

/** A session cookie as next-auth writes it at sign-in: a sealed token naming the user and a new session. */
async function sessionCookie(userId: string, role: Role = "customer", organizationId = "org-harborview") {
  const sid = startSession(db, userId);
  const token = await encode({ token: { sub: userId, sid, role, organizationId }, secret: SECRET });
  return { sid, cookie: `next-auth.session-token=${token}` };
}

function connect(cookie: string): Promise<{ socket: Socket; refused: string | null }> {
  const socket = ioClient(url, {
    extraHeaders: { cookie, origin: url },
    transports: ["websocket"],
    reconnection: false,
  });
  sockets.push(socket);
  return new Promise((resolve) => {
    socket.once("connect", () => resolve({ socket, refused: null }));
    socket.once("connect_error", (err) => resolve({ socket, refused: err.message }));
  });
}

/** The disconnect reason, or "open" when the socket is still connected after `ms`. */
function closedWithin(socket: Socket, ms: number): Promise<string> {
  return new Promise((resolve) => {
    if (socket.disconnected) return resolve("io server disconnect");
    const timer = setTimeout(() => resolve("open"), ms);
    socket.once("disconnect", (reason) => {
      clearTimeout(timer);
      resolve(reason);
    });
  });
}

describe("live sockets follow their session and account", () => {
  it("signing out closes that session's sockets at once; the same person's other session stays", async () => {
    const one = await sessionCookie(CUSTOMER);
    const two = await sessionCookie(CUSTOMER);
    const a = await connect(one.cookie);
    const b = await connect(two.cookie);
    expect([a.refused, b.refused]).toEqual([null, null]);
    endSession(db, one.sid);
    expect(await closedWithin(a.socket, 500)).toBe("io server disconnect");
    expect(await closedWithin(b.socket, 300)).toBe("open");
    expect((await connect(one.cookie)).refused).toBe("unauthorized");
    expect(await b.socket.emitWithAck("site:join", { siteId: SITE })).toEqual({ data: { siteId: SITE } });
    b.socket.disconnect();
  });

  it("a changed role or organization closes the user's sockets at once, so they join again under the new scope", async () => {
    const { cookie } = await sessionCookie("user-tech-2", "technician", SERVICE_ORG.id);
    const s = await connect(cookie);
    expect(await s.socket.emitWithAck("site:join", { siteId: "quarry-ridge-dh2" })).toEqual({
      data: { siteId: "quarry-ridge-dh2" },
    });
    try {
      changeUserAccess(db, admin, "user-tech-2", { role: "customer", organizationId: "org-harborview" });
      expect(await closedWithin(s.socket, 500)).toBe("io server disconnect");
      // A new connection gets the new scope: another customer's site is not found.
      const again = await connect(cookie);
      expect(again.refused).toBeNull();
      expect(await again.socket.emitWithAck("site:join", { siteId: "quarry-ridge-dh2" })).toMatchObject({
        error: { code: "not_found" },
      });
      again.socket.disconnect();
    } finally {
      setUserAccess(db, "user-tech-2", { role: "technician", organizationId: SERVICE_ORG.id });
    }
  });

  it("a join re-reads the viewer: a role changed behind the server's back refuses the join and closes the socket", async () => {
    const { cookie } = await sessionCookie("user-tech-1", "technician", SERVICE_ORG.id);
    const s = await connect(cookie);
    expect(await s.socket.emitWithAck("board:join")).toMatchObject({ data: { siteIds: expect.any(Array) } });
    try {
      setUserAccess(db, "user-tech-1", { role: "customer", organizationId: "org-millbrook" });
      const closed = closedWithin(s.socket, 1000);
      const answer = await Promise.race([s.socket.emitWithAck("site:join", { siteId: SITE }), closed]);
      expect(answer).not.toHaveProperty("data");
      expect(await closed).toBe("io server disconnect");
      expect(io.sockets.adapter.rooms.get(`site:${SITE}`)?.size ?? 0).toBe(0);
    } finally {
      setUserAccess(db, "user-tech-1", { role: "technician", organizationId: SERVICE_ORG.id });
    }
  });

  it("disabling an account closes its sockets at once and ends its sessions", async () => {
    const { cookie } = await sessionCookie("user-org-millbrook", "customer", "org-millbrook");
    const s = await connect(cookie);
    expect(await s.socket.emitWithAck("site:join", { siteId: "millbrook-high" })).toEqual({
      data: { siteId: "millbrook-high" },
    });
    const values: unknown[] = [];
    s.socket.on("site:values", (v) => values.push(v));
    disableUser(db, admin, "user-org-millbrook");
    expect(await closedWithin(s.socket, 500)).toBe("io server disconnect");
    io.to("site:millbrook-high").emit("site:values", { siteId: "millbrook-high", values: [] });
    await new Promise((r) => setTimeout(r, 200));
    expect(values).toEqual([]);
    expect((await connect(cookie)).refused).toBe("unauthorized");
  });
});
