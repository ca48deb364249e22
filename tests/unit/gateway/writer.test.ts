import { describe, expect, it } from "vitest";
import { migrateDb, openDb } from "@/db/client";
import { gateways } from "@/db/schema";
import { seedDemo } from "@/db/seed/demo";
import type { CommittedRows, RowIn } from "@/gateway/row-columns";
import { createBatchWriter } from "@/gateway/writer";

// The batched writer on a fresh in-memory database: idempotent on (point, ts), rollups that
// count each reading once whatever order readings arrive in, latest value by event time.

function setup() {
  const db = openDb(":memory:");
  migrateDb(db);
  seedDemo(db, "unit-test-password");
  db.insert(gateways)
    .values({
      id: "gw-unit",
      siteId: "harborview-mob",
      name: "unit",
      protocol: "json",
      username: "gw-unit",
      passwordHash: "-",
    })
    .run();
  return db;
}
const row = (ts: number, value: number): RowIn => ({
  pointId: 1,
  siteId: "harborview-mob",
  ts,
  value,
  text: null,
  quality: 0,
  live: value,
});

describe("batch writer", () => {
  it("stores each (point, ts) once and keeps rollups and counters consistent with the rows", async () => {
    const db = setup();
    const committed: number[] = [];
    const w = createBatchWriter({ db, flushMs: 5, onCommitted: (rows) => committed.push(rows.length) });
    const minute = 60_000 * 1000;
    // Out of order within the minute, and a duplicate of 10 s with another value.
    const first = await w.submit({
      gatewayId: "gw-unit",
      messages: 1,
      receivedAtMs: 1,
      rows: [row(minute + 30_000, 5), row(minute + 10_000, 9), row(minute + 10_000, 100)],
    });
    expect(first).toEqual({ accepted: 2, duplicates: 1 });
    // A redelivery of the same message adds nothing; a later reading extends the bucket.
    const again = await w.submit({
      gatewayId: "gw-unit",
      messages: 1,
      receivedAtMs: 2,
      rows: [row(minute + 30_000, 5), row(minute + 10_000, 9), row(minute + 50_000, 2)],
    });
    expect(again).toEqual({ accepted: 1, duplicates: 2 });

    const r = db.$client
      .prepare(
        "select min, max, sum, count, last, last_ts as lastTs from readings_1m where point_id = 1 and bucket = ?",
      )
      .get(minute);
    // min 2, max 9, sum 5 + 9 + 2, three readings, last by event time = the 50 s one
    expect(r).toEqual({ min: 2, max: 9, sum: 16, count: 3, last: 2, lastTs: minute + 50_000 });
    expect(db.$client.prepare("select count(*) as n from readings where point_id = 1").get()).toEqual({ n: 3 });
    expect(
      db.$client.prepare("select messages, readings_accepted as a, readings_duplicate as d from gateways").get(),
    ).toEqual({ messages: 2, a: 3, d: 3 });
    expect(committed.reduce((a, b) => a + b, 0)).toBe(3);

    // An older reading arriving late is stored but does not replace the latest value, which is
    // written behind the readings (at the latest at close).
    await w.submit({ gatewayId: "gw-unit", messages: 1, receivedAtMs: 3, rows: [row(minute - 60_000, 7)] });
    await w.close();
    expect(db.$client.prepare("select ts, value from latest_values where point_id = 1").get()).toEqual({
      ts: minute + 50_000,
      value: 2,
    });
  });

  it("hands the after-commit listener exactly the new rows as submitted: numbers, booleans, states and texts", async () => {
    const db = setup();
    const seen: Array<Pick<RowIn, "pointId" | "siteId" | "ts" | "quality" | "live">> = [];
    // maxRows 100 starts the queue's columns at 1,024 rows, so the first batch makes them grow.
    const onCommitted = (rows: CommittedRows) => {
      for (let i = 0; i < rows.length; i++)
        seen.push({
          pointId: rows.pointId(i),
          siteId: rows.siteId(i),
          ts: rows.ts(i),
          quality: rows.quality(i),
          live: rows.live(i),
        });
    };
    const w = createBatchWriter({ db, flushMs: 5, maxRows: 100, onCommitted });
    const site = "harborview-mob";
    const rows: RowIn[] = [];
    for (let i = 0; i < 1500; i++) {
      const ts = 60_000 * 2000 + i * 1000;
      const k = i % 4;
      if (k === 0) rows.push({ pointId: 1, siteId: site, ts, value: i / 8, text: null, quality: 0, live: i / 8 });
      else if (k === 1)
        rows.push({
          pointId: 2,
          siteId: site,
          ts,
          value: i % 8 === 1 ? 1 : 0,
          text: null,
          quality: 1,
          live: i % 8 === 1,
        });
      else if (k === 2)
        rows.push({ pointId: 3, siteId: site, ts, value: null, text: "running", quality: 0, live: "running" });
      else rows.push({ pointId: 4, siteId: site, ts, value: null, text: `fault ${i}`, quality: 2, live: `fault ${i}` });
    }
    expect(await w.submit({ gatewayId: "gw-unit", messages: 1, receivedAtMs: 1, rows: rows.slice(0, 1200) })).toEqual({
      accepted: 1200,
      duplicates: 0,
    });
    // Overlaps the first by 100 rows: those are duplicates and are not handed on again.
    expect(await w.submit({ gatewayId: "gw-unit", messages: 1, receivedAtMs: 2, rows: rows.slice(1100) })).toEqual({
      accepted: 300,
      duplicates: 100,
    });
    expect(seen).toEqual(
      rows.map(({ pointId, siteId, ts, quality, live }) => ({ pointId, siteId, ts, quality, live })),
    );
    await w.close();
  });

  it("rejects every submit of a flush whose transaction fails, so nothing is acknowledged", async () => {
    const db = setup();
    const w = createBatchWriter({ db, flushMs: 5 });
    // Point 999999 does not exist: the foreign key fails the whole transaction.
    const good = w.submit({ gatewayId: "gw-unit", messages: 1, receivedAtMs: 1, rows: [row(1_000, 1)] });
    const bad = w.submit({
      gatewayId: "gw-unit",
      messages: 1,
      receivedAtMs: 1,
      rows: [{ ...row(2_000, 1), pointId: 999_999 }],
    });
    await expect(good).rejects.toThrow();
    await expect(bad).rejects.toThrow();
    expect(db.$client.prepare("select count(*) as n from readings").get()).toEqual({ n: 0 });
  });

  it("commits a burst soon after it ends, in one transaction, without waiting out the flush window", async () => {
    const db = setup();
    const w = createBatchWriter({ db, flushMs: 250, idleMs: 5 });
    const t0 = performance.now();
    // Three messages of one burst (one socket read) land in the same flush.
    await Promise.all(
      [1, 2, 3].map((i) => w.submit({ gatewayId: "gw-unit", messages: 1, receivedAtMs: i, rows: [row(i * 1000, i)] })),
    );
    expect(performance.now() - t0).toBeLessThan(200);
    expect(w.stats().flushes).toBe(1);
    await w.close();

    // Messages that keep arriving inside the idle gap share one flush, started by the window.
    const w2 = createBatchWriter({ db, flushMs: 100, idleMs: 50 });
    const arrivals: Array<Promise<unknown>> = [];
    for (let i = 0; i < 6; i++) {
      arrivals.push(
        w2.submit({ gatewayId: "gw-unit", messages: 1, receivedAtMs: 10 + i, rows: [row(10_000 + i * 1000, i)] }),
      );
      await new Promise((r) => setTimeout(r, 5));
    }
    await Promise.all(arrivals);
    expect(w2.stats().flushes).toBe(1);
    await w2.close();
  });
});
