import path from "node:path";
import { eq } from "drizzle-orm";
import { io, type Socket } from "socket.io-client";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openDb } from "@/db/client";
import { alarmForCustomerMail } from "@/db/queries/notify";
import { saveAlarmChanges } from "@/db/queries/alarms";
import { getViewerById } from "@/db/queries/users";
import { sites } from "@/db/schema";
import { applyConditions, emptyAlarmBook } from "@/lib/alarms";
import type { BoardSiteDto } from "@/lib/dto/board";
import type { Ack } from "@/lib/realtime/events";
import { createEquipment, createSite } from "@/lib/server/plant-records";
import { openVisit } from "@/lib/server/visits";
import { seedBoard } from "../helpers/board-seed";
import { api } from "../helpers/mqtt";
import { signIn, startServer, type TestServer } from "../helpers/server";

// A training site exists for drills. The rule (schema comment on sites.training, and the issue
// that asks for it): it never shows to a customer, anywhere, even one whose organization owns it;
// to them it answers exactly like a site that does not exist (404, the project's authorization
// convention in DEVELOPERS.md). Technicians see it on the board, marked "Training", after real sites.
const DRILL = "millbrook-drill";
const OWNER = "facilities@millbrook.example";
const TECH = "luis@tallgrass.example";
let server: TestServer;
let customer: string;
let tech: string;
const sockets: Socket[] = [];

beforeAll(async () => {
  const seeded = seedBoard({ sites: 3, customers: 1 });
  const db = openDb(path.join(seeded.dataDir, "liftline.db"));
  try {
    const admin = getViewerById(db, "user-admin")!;
    // Owned by the school's organization on purpose: the hardest case is the owner's own customer.
    createSite(
      db,
      admin,
      {
        name: "Aaa Drill Plant",
        kind: "Training",
        address: "1 Simulator Lane",
        timeZone: "America/Chicago",
        contacts: [],
        accessNotes: "",
        customerId: "org-millbrook",
      },
      { id: DRILL },
    );
    createEquipment(db, admin, DRILL, {
      kind: "chiller",
      tag: "CH-1",
      name: "Chiller 1",
      capacityTons: 300,
      refrigerant: "R-134a",
      compressorType: "centrifugal_vsd_oil_free",
    });
    // No use case marks a site for training yet (drills create them); the column is set directly.
    db.update(sites).set({ training: true }).where(eq(sites.id, DRILL)).run();
    const { book, transitions } = applyConditions(
      emptyAlarmBook(),
      [{ ruleId: "chiller_tripped", equipment: "CH-1", active: true, priority: 1, latching: true }],
      Date.now() - 60_000,
    );
    saveAlarmChanges(db, DRILL, [...book.values()], transitions, new Map());
    openVisit({ db, nowMs: Date.now() }, getViewerById(db, "user-tech-1")!, { siteId: DRILL, mode: "remote" });
    // The customers' opt-in alarm e-mail reads its site through this query: a drill's alarm has none.
    expect(alarmForCustomerMail(db, DRILL, [...book.keys()][0])).toBeNull();
  } finally {
    db.$client.close();
  }
  server = await startServer({ dataDir: seeded.dataDir });
  customer = (await signIn(server.url, OWNER)).cookie!;
  tech = (await signIn(server.url, TECH)).cookie!;
}, 180_000);

afterAll(async () => {
  for (const s of sockets) s.disconnect();
  await server?.stop();
});

function socketFor(cookie: string): Promise<Socket> {
  return new Promise((resolve, reject) => {
    const s = io(server.url, {
      extraHeaders: { cookie, origin: server.url },
      transports: ["websocket"],
      reconnection: false,
    });
    sockets.push(s);
    s.once("connect", () => resolve(s));
    s.once("connect_error", reject);
  });
}

const boardOrder = (html: string) =>
  [...html.matchAll(/data-testid="site-card" data-site="([^"]+)"/g)].map((m) => m[1]);

describe("a training site, to the customer whose organization owns it", () => {
  it("is on no list: board, sites, alarms, visits, and the customer's site count", { timeout: 120_000 }, async () => {
    const board = await api(server, customer, "/api/board");
    expect(board.status).toBe(200);
    const ids = (board.body.sites as BoardSiteDto[]).map((s) => s.id);
    expect(ids).toContain("millbrook-high");
    expect(ids).not.toContain(DRILL);
    expect((await api(server, customer, "/api/sites")).body.sites.map((s: { id: string }) => s.id)).not.toContain(
      DRILL,
    );
    const alarms = await api(server, customer, "/api/alarms");
    expect(alarms.body.alarms.some((a: { siteId: string }) => a.siteId === DRILL)).toBe(false);
    const visits = await api(server, customer, "/api/visits");
    expect(JSON.stringify(visits.body)).not.toContain(DRILL);
    const customers = await api(server, customer, "/api/customers");
    expect(customers.body.customers).toEqual([expect.objectContaining({ id: "org-millbrook", siteCount: 1 })]);
  });

  // Development-mode servers compile a page on its first request: minutes on a busy machine.
  it("answers 404 by id, page and API alike, like a site that does not exist", { timeout: 240_000 }, async () => {
    for (const p of [`/api/sites/${DRILL}`, `/api/sites/${DRILL}/latest`, `/api/sites/${DRILL}/files`])
      expect((await api(server, customer, p)).status, p).toBe(404);
    expect((await api(server, customer, `/api/sites/${DRILL}`)).body).toEqual(
      (await api(server, customer, "/api/sites/no-such-site")).body,
    );
    const page = await fetch(`${server.url}/sites/${DRILL}`, { headers: { cookie: customer } });
    expect(page.status).toBe(404);
    const html = await (await fetch(`${server.url}/`, { headers: { cookie: customer } })).text();
    expect(boardOrder(html)).toEqual(["millbrook-high"]);
    expect(html).not.toContain("Aaa Drill Plant");
  });

  it("is not among the board rooms the customer's socket joins, and its own room is refused", async () => {
    const s = await socketFor(customer);
    const board = await s.emitWithAck("board:join");
    expect("data" in board && board.data.siteIds).toEqual(["millbrook-high"]);
    const join = (await s.emitWithAck("site:join", { siteId: DRILL })) as Ack<{ siteId: string }>;
    expect("error" in join && join.error.code).toBe("not_found");
  });
});

describe("a training site, to a technician", () => {
  it(
    "is on the board marked Training, after every real site even with the most urgent alarm",
    { timeout: 240_000 },
    async () => {
      const board = await api(server, tech, "/api/board");
      const drill = (board.body.sites as BoardSiteDto[]).find((s) => s.id === DRILL);
      expect(drill).toMatchObject({ training: true, openVisits: 1, status: { worst: { priority: 1 } } });
      const html = await (await fetch(`${server.url}/`, { headers: { cookie: tech } })).text();
      const order = boardOrder(html);
      expect(order.length).toBe(3 + 3 + 1);
      expect(order.at(-1)).toBe(DRILL);
      expect(html).toMatch(/data-site="millbrook-drill" data-training="true"[\s\S]*?>Training</);
      const s = await socketFor(tech);
      const join = (await s.emitWithAck("site:join", { siteId: DRILL })) as Ack<{ siteId: string }>;
      expect("data" in join).toBe(true);
    },
  );
});
