import Database from "better-sqlite3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signIn, startServer, type TestServer } from "../helpers/server";

// A chiller's refrigerant log through the API: staff append, customers read their own, corrections
// are new entries, and the database itself refuses to edit or delete an entry (triggers of
// migration 0009) — records like these are often required by law (e.g. 40 CFR §82.157(l), recalled).

let server: TestServer;
const cookies: Record<string, string> = {};
const accounts = {
  admin: "admin@tallgrass.example",
  technician: "luis@tallgrass.example",
  customer: "facilities@harborview.example",
} as const;
type Who = keyof typeof accounts;
let ownChiller: string;
let ownPump: string;
let otherChiller: string;

function call(who: Who, urlPath: string, init: RequestInit = {}): Promise<Response> {
  const headers = new Headers(init.headers);
  headers.set("cookie", cookies[who]);
  headers.set("origin", server.url);
  if (init.body) headers.set("content-type", "application/json");
  return fetch(server.url + urlPath, { ...init, headers });
}

const post = (who: Who, equipmentId: string, body: unknown) =>
  call(who, `/api/equipment/${equipmentId}/refrigerant`, { method: "POST", body: JSON.stringify(body) });

beforeAll(async () => {
  server = await startServer();
  for (const [role, email] of Object.entries(accounts)) {
    const res = await signIn(server.url, email);
    expect(res.cookie, `sign-in of ${role}`).toBeTruthy();
    cookies[role] = res.cookie!;
  }
  const d = new Database(server.databasePath, { readonly: true });
  const pick = (site: string, kind: string) =>
    (
      d.prepare("select id from equipment where site_id = ? and kind = ? order by tag").get(site, kind) as {
        id: string;
      }
    ).id;
  ownChiller = pick("harborview-mob", "chiller");
  ownPump = pick("harborview-mob", "pump");
  otherChiller = pick("quarry-ridge-dh2", "chiller");
  d.close();
}, 180_000);

afterAll(async () => {
  await server?.stop();
});

describe("refrigerant log", () => {
  it("technicians and admins append; totals and the leak rate follow (40 CFR §82.152 annualizing, recalled)", async () => {
    // 500 lb = 226.796 kg full charge; 10 lb = 4.536 kg added 60 days later:
    // (10/500) × (365/60) × 100 = 12.17 %/yr. Entered in kg; the ratio is the same.
    const full = await post("admin", ownChiller, {
      kind: "full_charge",
      amountKg: 226.796,
      reason: "Recharged after tube repair",
      cylinder: "CYL-0042",
      at: "2024-01-01T12:00:00Z",
    });
    expect(full.status).toBe(201);
    const added = await post("technician", ownChiller, {
      kind: "added",
      amountKg: 4.536,
      reason: "Low charge at the sight glass",
      cylinder: "CYL-0051",
      at: "2024-03-01T12:00:00Z",
    });
    expect(added.status).toBe(201);
    const { entry } = await added.json();
    expect(entry.by.name).toBeTruthy();

    const log = await (await call("technician", `/api/equipment/${ownChiller}/refrigerant`)).json();
    expect(log.entries).toHaveLength(2);
    expect(log.summary.fullChargeSource).toBe("full_charge_entry");
    expect(log.summary.chargedSinceFullChargeKg).toBeCloseTo(4.536, 6);
    expect(log.summary.latestLeakRatePct).toBeCloseTo(12.17, 1);
  });

  it("a correction is a new entry naming the one it corrects, and the totals include it", async () => {
    const log = await (await call("technician", `/api/equipment/${ownChiller}/refrigerant`)).json();
    const addedId = log.entries.find((e: { kind: string }) => e.kind === "added").id;
    const res = await post("technician", ownChiller, {
      kind: "correction",
      correctsId: addedId,
      amountKg: -0.5,
      reason: "Scale read wrong; 4.036 kg added",
    });
    expect(res.status).toBe(201);
    const after = await (await call("technician", `/api/equipment/${ownChiller}/refrigerant`)).json();
    expect(after.entries).toHaveLength(3);
    expect(after.entries.find((e: { id: number }) => e.id === addedId).amountKg).toBeCloseTo(4.536, 6);
    expect(after.summary.chargedSinceFullChargeKg).toBeCloseTo(4.036, 6);
    // A correction must name an entry of this chiller.
    expect(
      (await post("technician", ownChiller, { kind: "correction", correctsId: 999_999, amountKg: 1, reason: "typo" }))
        .status,
    ).toBe(404);
  });

  it("validates entries by kind", async () => {
    const noAmount = await post("technician", ownChiller, { kind: "added", reason: "top-up" });
    expect(noAmount.status).toBe(400);
    const noResult = await post("technician", ownChiller, { kind: "leak_check", reason: "annual check" });
    expect(noResult.status).toBe(400);
    const future = await post("technician", ownChiller, {
      kind: "leak_check",
      result: "no_leak",
      reason: "annual check",
      at: new Date(Date.now() + 86_400_000).toISOString(),
    });
    expect(future.status).toBe(400);
  });

  it("customers read their own chiller's log but cannot add to it; other organizations' chillers are 404", async () => {
    expect((await call("customer", `/api/equipment/${ownChiller}/refrigerant`)).status).toBe(200);
    // Ids hold a colon (`site:CH-1`); a link or fetch that percent-encodes it reaches the same log.
    expect((await call("customer", `/api/equipment/${encodeURIComponent(ownChiller)}/refrigerant`)).status).toBe(200);
    const refused = await post("customer", ownChiller, { kind: "added", amountKg: 1, reason: "top-up" });
    expect(refused.status).toBe(403);
    expect((await call("customer", `/api/equipment/${otherChiller}/refrigerant`)).status).toBe(404);
    expect((await post("customer", otherChiller, { kind: "added", amountKg: 1, reason: "x y z" })).status).toBe(404);
    expect((await call("technician", `/api/equipment/${otherChiller}/refrigerant`)).status).toBe(200);
    // Only chillers keep a refrigerant log.
    expect((await call("technician", `/api/equipment/${ownPump}/refrigerant`)).status).toBe(404);
  });

  it("the database refuses to edit or delete an entry (append-only triggers)", () => {
    const d = new Database(server.databasePath);
    try {
      const before = d.prepare("select count(*) as n from refrigerant_log").get() as { n: number };
      expect(before.n).toBeGreaterThan(0);
      expect(() => d.prepare("update refrigerant_log set amount_kg = 0").run()).toThrow(/append-only/);
      expect(() => d.prepare("delete from refrigerant_log").run()).toThrow(/append-only/);
      expect((d.prepare("select count(*) as n from refrigerant_log").get() as { n: number }).n).toBe(before.n);
    } finally {
      d.close();
    }
  });
});
