import { pointsOf } from "@/simulator/points";
import { siteLayouts } from "@/simulator/layout";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import bcrypt from "bcryptjs";
import { BCRYPT_COST } from "@/db/password";
import { verifyCredentials } from "@/db/queries/users";
import { DEMO_SITES, DEMO_STAFF, seedDemo } from "@/db/seed/demo";

let db: Db | undefined;
afterEach(() => db?.$client.close());

function freshDb(): Db {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-migrate-"));
  db = openDb(path.join(dir, "test.db"));
  return db;
}

const count = (d: Db, table: string) =>
  (d.$client.prepare(`select count(*) as n from ${table}`).get() as { n: number }).n;

describe("migrations", () => {
  it("apply to a fresh database and create every table", () => {
    const d = freshDb();
    migrateDb(d);
    const tables = (
      d.$client.prepare("select name from sqlite_master where type='table'").all() as { name: string }[]
    ).map((t) => t.name);
    for (const t of ["organizations", "users", "sites", "equipment", "points", "api_tokens"])
      expect(tables).toContain(t);
  });

  it("run twice without error (already-applied migrations are skipped)", () => {
    const d = freshDb();
    migrateDb(d);
    expect(() => migrateDb(d)).not.toThrow();
  });

  it("open connections in WAL mode with foreign keys enforced", () => {
    const d = freshDb();
    expect(d.$client.pragma("journal_mode", { simple: true })).toBe("wal");
    expect(d.$client.pragma("foreign_keys", { simple: true })).toBe(1);
    migrateDb(d);
    expect(() =>
      d.$client
        .prepare(
          "insert into sites (id, name, organization_id, kind, address, time_zone) values ('x','x','no-such-org','x','x','UTC')",
        )
        .run(),
    ).toThrow(/FOREIGN KEY/);
  });
});

describe("demo seed", () => {
  it("creates the demo company, three customer sites and their equipment and points", () => {
    const d = freshDb();
    migrateDb(d);
    seedDemo(d, "a-demo-password");
    expect(count(d, "sites")).toBe(3);
    expect(count(d, "organizations")).toBe(4);
    expect(count(d, "users")).toBe(DEMO_STAFF.length + DEMO_SITES.length);
    const expectedEquipment = DEMO_SITES.reduce((n, s) => n + s.equipment.length, 0);
    expect(count(d, "equipment")).toBe(expectedEquipment);
    // Every point the simulated plant publishes, optional ones (a tower bypass valve) included.
    const expectedPoints = DEMO_SITES.reduce(
      (n, s) => n + s.equipment.reduce((m, e) => m + pointsOf(siteLayouts[s.layout], e.kind).length, 0),
      0,
    );
    expect(count(d, "points")).toBe(expectedPoints);
    // every site has at least one water-cooled chiller, a tower, pumps, air handlers and a weather station
    for (const site of DEMO_SITES) {
      const kinds = new Set(site.equipment.map((e) => e.kind));
      expect([...kinds].sort()).toEqual(["air_handler", "chiller", "cooling_tower", "pump", "weather_station"]);
    }
  });

  it("is idempotent: a second run inserts nothing", () => {
    const d = freshDb();
    migrateDb(d);
    const first = seedDemo(d, "a-demo-password");
    const before = ["organizations", "users", "sites", "equipment", "points"].map((t) => count(d, t));
    const second = seedDemo(d, "a-demo-password");
    const after = ["organizations", "users", "sites", "equipment", "points"].map((t) => count(d, t));
    expect(first.inserted).toBeGreaterThan(0);
    expect(second.inserted).toBe(0);
    expect(after).toEqual(before);
  });

  it("hashes demo passwords at the cost of every other account, and brings an older, cheaper seed up to it", async () => {
    // One cost for all (OWASP Authentication Cheat Sheet, "Authentication Responses"): a cheaper
    // demo hash answered a wrong password in a third of the time an unknown e-mail took.
    const d = freshDb();
    migrateDb(d);
    seedDemo(d, "a-demo-password");
    const rounds = () =>
      (d.$client.prepare("select password_hash as h from users").all() as { h: string }[]).map((r) =>
        bcrypt.getRounds(r.h),
      );
    expect(new Set(rounds())).toEqual(new Set([BCRYPT_COST]));
    const old = bcrypt.hashSync("a-demo-password", 10);
    d.$client.prepare("update users set password_hash = ?").run(old);
    seedDemo(d, "a-demo-password");
    expect(new Set(rounds())).toEqual(new Set([BCRYPT_COST]));
    // A cheaper hash of any other account is upgraded at its next sign-in.
    d.$client.prepare("update users set password_hash = ? where id = 'user-tech-1'").run(old);
    expect(await verifyCredentials(d, "luis@tallgrass.example", "a-demo-password")).not.toBeNull();
    const luis = d.$client.prepare("select password_hash as h from users where id = 'user-tech-1'").get() as {
      h: string;
    };
    expect(bcrypt.getRounds(luis.h)).toBe(BCRYPT_COST);
  });
});
