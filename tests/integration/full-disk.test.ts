import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import Database from "better-sqlite3";
import type { MqttClient } from "mqtt";
import { afterAll, describe, expect, it } from "vitest";
import { api, connectGateway, provisionGateway, putPointMap, readingsMessage, waitFor } from "../helpers/mqtt";
import { signIn, startServer, type TestServer } from "../helpers/server";

// The server on a full disk, twice: with SQLite's own page limit raising SQLITE_FULL ("database
// or disk is full", https://www.sqlite.org/rescode.html#full) on both of its connections, which
// always runs; and on a real tmpfs filled to the last byte (ENOSPC), which needs mount rights.
// Either way: health says degraded with the reason, a write answers 503 with a clear message,
// the admins get one e-mail, a gateway can still connect, every acknowledged reading is stored
// (MQTT 3.1.1 §4.3.2: the receiver owns a QoS 1 message once it sends PUBACK), and when space
// returns health is ok again.

const SITE = "harborview-mob";
const ADMINS = ["admin@tallgrass.example"];
const POINT_MAP = [
  "gateway_point,equipment,quantity,unit",
  "CH1-ALM,CH-1,chiller_alarm,bool",
  "CH1-FAULT,CH-1,fault_text,text",
  "CH1-RUN,CH-1,run_status,bool",
  "CH1-LCHWT,CH-1,chilled_water_leaving_temp,degC",
].join("\n");
/**
 * STORAGE_RECOVERY_S for these servers. Small writes still fit while large ones fail (as on a
 * nearly full disk), so storage counts as working again only this long after the last failure.
 */
const RECOVERY_S = 5;
/** Readings per message while full: more than one 16 KB page of rows, so a commit needs new pages. */
const BIG = 600;

interface Disk {
  fill(): Promise<void> | void;
  free(): Promise<void> | void;
}

/** Publishes one QoS 1 message; true when PUBACKed, false when refused or not answered in time. */
function publishAcked(client: MqttClient, topic: string, payload: string, timeoutMs = 8000): Promise<boolean> {
  return new Promise((resolve) => {
    const timer = setTimeout(() => resolve(false), timeoutMs);
    client.publish(topic, payload, { qos: 1 }, (err) => {
      clearTimeout(timer);
      resolve(!err);
    });
    client.once("close", () => {
      clearTimeout(timer);
      resolve(false);
    });
  });
}

async function fullDiskScenario(server: TestServer, disk: Disk) {
  const cookie = {
    admin: (await signIn(server.url, "admin@tallgrass.example")).cookie!,
    tech: (await signIn(server.url, "luis@tallgrass.example")).cookie!,
    owner: (await signIn(server.url, "facilities@harborview.example")).cookie!,
  };
  const gw = await provisionGateway(server, cookie.admin, { siteId: SITE });
  expect((await putPointMap(server, cookie.admin, gw.gateway.id, POINT_MAP)).status).toBe(200);
  const topic = `liftline/${gw.gateway.id}/readings`;

  // A tripped chiller raises an alarm to write notes on (two samples: rules step every 5 s).
  let client = await connectGateway(server, gw);
  // Hours back, so tens of thousands of readings 100 ms apart stay in the past (the contract refuses future ones).
  const t0 = Date.now() - 6 * 3600_000;
  for (const [i, ts] of [t0, t0 + 10_000].entries()) {
    const at = new Date(ts).toISOString();
    const trip = [
      { point: "CH1-ALM", value: true, ts: at },
      { point: "CH1-FAULT", value: "High condenser pressure", ts: at },
      { point: "CH1-RUN", value: false, ts: at },
    ];
    expect(await publishAcked(client, topic, readingsMessage(trip, i))).toBe(true);
  }
  const alarmId = await waitFor(async () => {
    const { body } = await api(server, cookie.tech, `/api/alarms?site=${SITE}`);
    return body.alarms?.find((a: { ruleId: string }) => a.ruleId === "chiller_tripped")?.id as string | undefined;
  }, 30_000);

  let seq = 10;
  let nextTs = t0 + 20_000;
  const acked: number[] = [];
  const refused: number[] = [];
  const message = (n: number) => {
    const ts = Array.from({ length: n }, () => (nextTs += 100));
    return {
      ts,
      payload: readingsMessage(
        ts.map((t, i) => ({ point: "CH1-LCHWT", value: 6 + (i % 10) / 10, ts: new Date(t).toISOString() })),
        seq++,
      ),
    };
  };
  const publishReadings = async (n: number) => {
    if (!client.connected) client = await connectGateway(server, gw);
    const m = message(n);
    const ok = await publishAcked(client, topic, m.payload);
    (ok ? acked : refused).push(...m.ts);
    return ok;
  };

  for (let i = 0; i < 5; i++) expect(await publishReadings(20)).toBe(true);
  expect((await fetch(`${server.url}/api/health`)).status).toBe(200);

  await disk.fill();

  // Readings while full: published until the server refuses one (no PUBACK), at most 400 times. The WAL
  // file keeps the size the seed's writes gave it, so the first readings can still fit in it.
  let refusals = 0;
  for (let i = 0; i < 400 && refusals < 3; i++) if (!(await publishReadings(BIG))) refusals++;
  expect(refusals, "the server refused readings it could not store").toBeGreaterThan(0);

  const health = await waitFor(async () => {
    const res = await fetch(`${server.url}/api/health`);
    return res.status === 503 ? { status: res.status, body: await res.json() } : null;
  });
  expect(health.body).toMatchObject({ ok: false, status: "degraded", db: true, storage: { status: "degraded" } });
  expect(health.body.storage.reason).toMatch(/SQLITE_FULL|ENOSPC|database or disk is full/);

  // A note is one row: posted until one needs space that is not there (a 16 KB page holds four).
  let refusedNote: { status: number; body: { error?: { code: string; message: string } } } | undefined;
  for (let i = 0; i < 60 && !refusedNote; i++) {
    const res = await api(server, cookie.tech, `/api/alarms/${alarmId}/notes`, {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({
        text: `Note ${i}: ${"checked the condenser water strainer. ".repeat(120)}`.slice(0, 4000),
        visibility: "internal",
      }),
    });
    if (res.status !== 201) refusedNote = res;
  }
  expect(refusedNote?.status, JSON.stringify(refusedNote?.body)).toBe(503);
  expect(refusedNote?.body.error?.code).toBe("unavailable");
  expect(refusedNote?.body.error?.message).toMatch(/^Liftline cannot save right now: the server's disk is full\./);

  // The admins' e-mail: in the sink's outbox (held in memory while the database cannot take it).
  const mail = await waitFor(async () => {
    const { body } = await api(server, cookie.admin, "/api/outbox");
    const found = (body.messages as Array<{ to: string; subject: string; text: string }>).filter((m) =>
      m.subject.includes("The server cannot save: disk full"),
    );
    return found.length >= ADMINS.length ? found : null;
  }, 15_000);
  expect(mail.map((m) => m.to).sort()).toEqual(ADMINS);
  expect(mail[0].text).toMatch(/disk is full/);

  // The system alarm on staff pages, not on a building owner's. Gateways keep sending meanwhile,
  // and keep failing, as they would.
  expect(await publishReadings(BIG)).toBe(false);
  const page = async (who: keyof typeof cookie) =>
    (await fetch(`${server.url}/alarms`, { headers: { cookie: cookie[who] } })).text();
  expect(await page("tech")).toContain('data-testid="storage-alarm"');
  expect(await page("owner")).not.toContain('data-testid="storage-alarm"');

  // A new CONNECT still gets its CONNACK (its presence write runs inside the broker's CONNECT).
  client.end(true);
  client = await connectGateway(server, gw);
  expect(client.connected).toBe(true);

  await disk.free();
  // The next commit RECOVERY_S after the last failure clears the alarm.
  await new Promise((r) => setTimeout(r, RECOVERY_S * 1000 + 500));
  expect(await publishReadings(BIG)).toBe(true);
  const back = await waitFor(async () => {
    const res = await fetch(`${server.url}/api/health`);
    return res.status === 200 ? await res.json() : null;
  });
  expect(back).toMatchObject({ ok: true, status: "ok" });
  expect(
    (
      await api(server, cookie.tech, `/api/alarms/${alarmId}/notes`, {
        method: "POST",
        headers: { "content-type": "application/json" },
        body: JSON.stringify({ text: "Space freed; note saved.", visibility: "internal" }),
      })
    ).status,
  ).toBe(201);
  client.end(true);

  // Every acknowledged reading is stored.
  const db = new Database(server.databasePath, { readonly: true });
  try {
    const pointId = db
      .prepare("select point_id from gateway_point_maps where gateway_id = ? and gateway_point = 'CH1-LCHWT'")
      .pluck()
      .get(gw.gateway.id) as number;
    const stored = new Set(db.prepare("select ts from readings where point_id = ?").pluck().all(pointId) as number[]);
    const lost = acked.filter((ts) => !stored.has(ts));
    console.log(
      `full disk: ${acked.length} readings acknowledged, ${refused.length} refused, ${stored.size} stored; ${lost.length} acknowledged but not stored`,
    );
    const seen = server
      .output()
      .split("\n")
      .filter((l) => /\[storage\]|could not record|not stored|flush of/.test(l));
    console.log(`what the server logged:\n${[...new Set(seen.map((l) => l.slice(0, 200)))].slice(0, 12).join("\n")}`);
    expect(lost).toEqual([]);
    expect(refused.length).toBeGreaterThan(0);
  } finally {
    db.close();
  }
}

describe("a full disk (SQLite page limit)", () => {
  let server: TestServer | undefined;
  afterAll(() => server?.stop());

  it("degrades health, answers 503, mails the admins once, keeps acknowledged readings and recovers", async () => {
    const control = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "liftline-full-")), "disk");
    fs.writeFileSync(control, "free");
    server = await startServer({
      env: { LIFTLINE_TEST_FULL_DISK_FILE: control, STORAGE_RECOVERY_S: String(RECOVERY_S) },
    });
    await fullDiskScenario(server, {
      fill: () => fs.writeFileSync(control, "full"),
      free: () => fs.writeFileSync(control, "free"),
    });
    expect(server.output()).toMatch(/\[storage\] degraded/);
    expect(server.output()).toMatch(/\[storage\] writes succeed again/);
  }, 240_000);
});

/** A tmpfs of this size holds the demo database with room to spare; the test fills the rest. */
const TMPFS_SIZE = "48m";

const mount = (dir: string) =>
  execFileSync("mount", ["-t", "tmpfs", "-o", `size=${TMPFS_SIZE},mode=0700`, "tmpfs", dir], { stdio: "pipe" });

/** Whether this process may mount a tmpfs (root or CAP_SYS_ADMIN); the reason when not. */
function cannotMount(): string | null {
  const probe = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-mount-probe-"));
  try {
    mount(probe);
    execFileSync("umount", [probe]);
    return null;
  } catch (err) {
    return err instanceof Error ? err.message.split("\n")[0] : String(err);
  } finally {
    fs.rmdirSync(probe);
  }
}

const mountError = cannotMount();
if (mountError)
  console.warn(
    `\n*** SKIPPED: the real full-disk test needs to mount a tmpfs (root or CAP_SYS_ADMIN): ${mountError} ***\n`,
  );

describe.skipIf(mountError !== null)("a full disk (a real tmpfs filled up)", () => {
  let server: TestServer | undefined;
  let mountPoint: string | undefined;
  afterAll(async () => {
    await server?.stop();
    if (mountPoint) {
      execFileSync("umount", [mountPoint]);
      fs.rmdirSync(mountPoint);
    }
  });

  it("degrades health, answers 503, mails the admins once, keeps acknowledged readings and recovers", async () => {
    mountPoint = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-tmpfs-"));
    mount(mountPoint);
    const filler = path.join(mountPoint, "filler");
    server = await startServer({ dataDir: mountPoint, env: { STORAGE_RECOVERY_S: String(RECOVERY_S) } });
    await fullDiskScenario(server, {
      fill: () => {
        // Every byte the filesystem has left, so the next page SQLite writes fails with ENOSPC.
        const fd = fs.openSync(filler, "w");
        try {
          for (const size of [64 * 1024, 512]) {
            const chunk = Buffer.alloc(size, 0x55);
            try {
              for (;;) fs.writeSync(fd, chunk);
            } catch (err) {
              if ((err as NodeJS.ErrnoException).code !== "ENOSPC") throw err;
            }
          }
        } finally {
          fs.closeSync(fd);
        }
      },
      free: () => fs.rmSync(filler),
    });
  }, 240_000);
});
