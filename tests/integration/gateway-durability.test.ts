import Database from "better-sqlite3";
import { afterAll, describe, expect, it } from "vitest";
import { startServer, type TestServer } from "../helpers/server";
import {
  adminCookie,
  api,
  connectGateway,
  endClient,
  provisionGateway,
  putPointMap,
  readingsMessage,
  type ProvisionedGateway,
} from "../helpers/mqtt";

// No acknowledged reading is lost: QoS 1 publishes stream in, the server is killed with
// SIGKILL mid-stream, and after a restart every reading whose PUBACK the publisher saw is in
// the database, none twice (rollups count each reading once), even after the publisher
// resends everything it was not sure of (MQTT 3.1.1 §4.3.2 at-least-once). Rollups of minutes
// still open live in the writer's memory (rebuilt from raw readings after the crash), so they
// are counted through the trend API while the server runs, and in the database after a clean stop.

const SITE = "quarry-ridge-dh2";
const PER_MESSAGE = 20;
let server: TestServer | undefined;

afterAll(async () => {
  await server?.stop();
});

describe("durability across kill -9", () => {
  it("keeps every PUBACKed reading, none twice", async () => {
    server = await startServer();
    const admin = await adminCookie(server);
    const gw: ProvisionedGateway = await provisionGateway(server, admin, { siteId: SITE, name: "Crash test" });
    expect(
      (
        await putPointMap(
          server,
          admin,
          gw.gateway.id,
          "gateway_point,equipment,quantity,unit\nKW,CH-1,compressor_power,kW\n",
        )
      ).status,
    ).toBe(200);
    const site = await api(server, admin, `/api/sites/${SITE}`);
    const pointId: number = site.body.site.equipment
      .find((e: { tag: string }) => e.tag === "CH-1")
      .points.find((p: { key: string }) => p.key === "compressor_power").id;

    const client = await connectGateway(server, gw);
    const base = Date.now() - 60_000;
    const acked = new Set<number>();
    const sent: number[] = [];
    let seq = 0;
    let stop = false;
    client.on("error", () => {});
    // Keep up to 50 messages in flight, as a busy gateway would.
    const pump = async () => {
      while (!stop) {
        const first = seq * PER_MESSAGE;
        const ts = Array.from({ length: PER_MESSAGE }, (_, i) => base + first + i);
        seq++;
        sent.push(...ts);
        const payload = readingsMessage(
          ts.map((t) => ({ point: "KW", value: t % 1000, ts: new Date(t).toISOString() })),
          seq,
        );
        await new Promise<void>((resolve) =>
          client.publish(`liftline/${gw.gateway.id}/readings`, payload, { qos: 1 }, (err) => {
            if (!err) for (const t of ts) acked.add(t);
            resolve();
          }),
        );
      }
    };
    const pumps = Array.from({ length: 50 }, () => pump());
    await new Promise((r) => setTimeout(r, 2500));
    const dataDir = server.dataDir;
    await server.stop("SIGKILL");
    stop = true;
    client.end(true);
    await Promise.race([Promise.all(pumps), new Promise((r) => setTimeout(r, 3000))]);
    const ackedAtKill = new Set(acked);
    expect(ackedAtKill.size, "readings were acknowledged before the kill").toBeGreaterThan(500);

    const stored = () => {
      const db = new Database(server!.databasePath, { readonly: true });
      try {
        const rows = db.prepare("select ts from readings where point_id = ?").all(pointId) as Array<{ ts: number }>;
        const rollupCount = (
          db.prepare("select coalesce(sum(count), 0) as n from readings_1m where point_id = ?").get(pointId) as {
            n: number;
          }
        ).n;
        const accepted = (
          db.prepare("select readings_accepted as n from gateways where id = ?").get(gw.gateway.id) as { n: number }
        ).n;
        return {
          stored: new Set(rows.map((r) => r.ts)),
          rowCount: rows.length,
          storedRollupCount: rollupCount,
          accepted,
        };
      } finally {
        db.close();
      }
    };
    // A day-long trend is drawn from rollups: stored minutes plus the minutes still open.
    const check = async () => {
      const s = stored();
      const res = await api(
        server!,
        admin,
        `/api/points/${pointId}/series?from=${base - 86_400_000}&to=${Date.now() + 120_000}&maxPoints=100`,
      );
      expect(res.body.series.source).toBe("rollup_1m");
      const rollupCount = (res.body.series.count as number[]).reduce((a, b) => a + b, 0);
      return { ...s, rollupCount };
    };

    // Restart on the same database (migrations and WAL recovery run at start).
    server = await startServer({ dataDir });
    let c = await check();
    const missing = [...ackedAtKill].filter((t) => !c.stored.has(t));
    expect(missing, "acknowledged readings missing after the crash").toEqual([]);
    expect(c.rollupCount).toBe(c.rowCount);
    expect(c.accepted).toBe(c.rowCount);

    // The publisher resends every message it sent (acknowledged or not): nothing is stored twice.
    const again = await connectGateway(server, gw);
    for (let i = 0; i < sent.length; i += 500) {
      const ts = sent.slice(i, i + 500);
      await again.publishAsync(
        `liftline/${gw.gateway.id}/readings`,
        readingsMessage(ts.map((t) => ({ point: "KW", value: t % 1000, ts: new Date(t).toISOString() }))),
        { qos: 1 },
      );
    }
    await endClient(again);
    c = await check();
    expect(c.rowCount).toBe(new Set(sent).size);
    expect(c.rollupCount).toBe(c.rowCount);
    expect(c.accepted).toBe(c.rowCount);

    // A clean stop writes every open minute: the stored rollups alone count each reading once.
    await server.stop();
    expect(stored().storedRollupCount).toBe(c.rowCount);
  }, 300_000);
});
