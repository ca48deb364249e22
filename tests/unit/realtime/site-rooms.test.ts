import { describe, expect, it } from "vitest";
import { createSiteRooms, type RoomSocket, type SiteEventHandlers } from "@/components/realtime/site-rooms";
import type { SiteStatus, SiteValues } from "@/lib/realtime/events";

// A stand-in for socket.io-client's socket: records what the tab sends and lets the test play the server.
function fakeSocket() {
  const listeners = new Map<string, Set<(...args: unknown[]) => void>>();
  const sent: string[] = [];
  let connectCalls = 0;
  const socket = {
    connected: false,
    active: false,
    connect() {
      connectCalls++;
      socket.active = true;
      return socket;
    },
    on(event: string, fn: (...args: unknown[]) => void) {
      if (!listeners.has(event)) listeners.set(event, new Set());
      listeners.get(event)!.add(fn);
      return socket;
    },
    off(event: string, fn: (...args: unknown[]) => void) {
      listeners.get(event)?.delete(fn);
      return socket;
    },
    emit(event: string, ...args: unknown[]) {
      const payload = args.find((a) => typeof a === "object" && a !== null) as { siteId?: string } | undefined;
      sent.push(payload?.siteId ? `${event} ${payload.siteId}` : event);
      return socket;
    },
  };
  const fire = (event: string, payload?: unknown) => listeners.get(event)?.forEach((fn) => fn(payload));
  return {
    socket: socket as unknown as RoomSocket,
    sent,
    connectCalls: () => connectCalls,
    listenerCount: () => [...listeners.values()].reduce((n, s) => n + s.size, 0),
    connect() {
      socket.connected = true;
      socket.active = true;
      fire("connect");
    },
    drop() {
      socket.connected = false;
    },
    fire,
  };
}

const status = (siteId: string): SiteStatus => ({ siteId, data: "live", worst: null, unacknowledged: 0 });
const values = (siteId: string): SiteValues => ({
  siteId,
  values: [{ pointId: 1, tsMs: 1, value: 1, quality: "good" }],
});

function panel() {
  const seen = { status: [] as string[], values: [] as string[], reconnects: 0 };
  const handlers: { current: SiteEventHandlers } = {
    current: {
      onStatus: (s) => seen.status.push(s.siteId),
      onValues: (v) => seen.values.push(v.siteId),
      onReconnect: () => seen.reconnects++,
    },
  };
  return { handlers, seen };
}

describe("one socket per tab, rooms counted per panel", () => {
  it("the socket connects only once a panel wants a room", () => {
    const rooms = createSiteRooms();
    const io = fakeSocket();
    rooms.attach(io.socket);
    expect(io.connectCalls()).toBe(0);
    rooms.subscribe({ siteId: "a" }, panel().handlers);
    rooms.subscribe("board", panel().handlers);
    expect(io.connectCalls()).toBe(1);

    const early = createSiteRooms();
    const io2 = fakeSocket();
    early.subscribe({ siteId: "a" }, panel().handlers);
    early.attach(io2.socket);
    expect(io2.connectCalls()).toBe(1);
  });

  it("panels that subscribe before the socket connects are joined once it does", () => {
    const rooms = createSiteRooms();
    const io = fakeSocket();
    rooms.subscribe({ siteId: "a" }, panel().handlers);
    rooms.subscribe({ siteId: "a" }, panel().handlers);
    rooms.subscribe("board", panel().handlers);
    rooms.attach(io.socket);
    expect(io.sent).toEqual([]);
    io.connect();
    expect(io.sent).toEqual(["site:join a", "board:join"]);
  });

  it("two panels on one site share the room: it is left only when the last one goes", () => {
    const rooms = createSiteRooms();
    const io = fakeSocket();
    rooms.attach(io.socket);
    io.connect();
    const first = rooms.subscribe({ siteId: "a" }, panel().handlers);
    const second = rooms.subscribe({ siteId: "a" }, panel().handlers);
    expect(io.sent).toEqual(["site:join a"]);
    first();
    first();
    expect(io.sent).toEqual(["site:join a"]);
    second();
    expect(io.sent).toEqual(["site:join a", "site:leave a"]);
    rooms.subscribe({ siteId: "a" }, panel().handlers);
    expect(io.sent).toEqual(["site:join a", "site:leave a", "site:join a"]);
  });

  it("a site panel gets its own site's values and status; a board panel gets every status and no values", () => {
    const rooms = createSiteRooms();
    const io = fakeSocket();
    rooms.attach(io.socket);
    io.connect();
    const site = panel();
    const board = panel();
    rooms.subscribe({ siteId: "a" }, site.handlers);
    rooms.subscribe("board", board.handlers);
    io.fire("site:values", values("a"));
    io.fire("site:values", values("b"));
    io.fire("site:status", status("a"));
    io.fire("site:status", status("b"));
    expect(site.seen).toEqual({ status: ["a"], values: ["a"], reconnects: 0 });
    expect(board.seen).toEqual({ status: ["a", "b"], values: [], reconnects: 0 });
  });

  it("the board's rooms are left when the last board panel goes", () => {
    const rooms = createSiteRooms();
    const io = fakeSocket();
    rooms.attach(io.socket);
    io.connect();
    const first = rooms.subscribe("board", panel().handlers);
    const second = rooms.subscribe("board", panel().handlers);
    first();
    expect(io.sent).toEqual(["board:join"]);
    second();
    expect(io.sent).toEqual(["board:join", "board:leave"]);
  });

  it("on reconnect every room still wanted is joined again and every panel refetches; a released one does neither", () => {
    const rooms = createSiteRooms();
    const io = fakeSocket();
    rooms.attach(io.socket);
    io.connect();
    const kept = panel();
    const gone = panel();
    rooms.subscribe({ siteId: "a" }, kept.handlers);
    rooms.subscribe("board", kept.handlers);
    rooms.subscribe({ siteId: "b" }, gone.handlers)();
    io.sent.length = 0;
    io.drop();
    rooms.subscribe({ siteId: "c" }, kept.handlers);
    expect(io.sent).toEqual([]);
    io.connect();
    expect(io.sent).toEqual(["site:join a", "board:join", "site:join c"]);
    expect(kept.seen.reconnects).toBe(3);
    expect(gone.seen.reconnects).toBe(0);
  });

  it("a detached socket is no longer listened to or sent on", () => {
    const rooms = createSiteRooms();
    const io = fakeSocket();
    const detach = rooms.attach(io.socket);
    io.connect();
    detach();
    expect(io.listenerCount()).toBe(0);
    rooms.subscribe({ siteId: "a" }, panel().handlers);
    expect(io.sent).toEqual([]);
  });
});

describe("a socket the server closed", () => {
  it("connects once more while panels want rooms, so a changed scope is picked up; a dropped line is left to socket.io", () => {
    const rooms = createSiteRooms();
    const io = fakeSocket();
    rooms.attach(io.socket);
    rooms.subscribe({ siteId: "a" }, panel().handlers);
    io.connect();
    const before = io.connectCalls();
    io.drop();
    io.fire("disconnect", "transport close");
    expect(io.connectCalls()).toBe(before);
    io.fire("disconnect", "io server disconnect");
    expect(io.connectCalls()).toBe(before + 1);
  });
});
