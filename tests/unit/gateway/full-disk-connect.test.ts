import mqtt from "mqtt";
import { afterEach, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { createGateway } from "@/db/queries/gateways";
import { SERVICE_ORG, seedDemo } from "@/db/seed/demo";
import { startGatewaySide, type GatewaySide } from "@/gateway/index";
import { systemViewer } from "@/lib/auth/viewer";

// A gateway's CONNECT on a full disk: recording it as online is a write inside the broker's
// CONNECT handling, and it fails; the gateway must still get its CONNACK (MQTT 3.1.1 §3.2: the
// server sends CONNACK in response to CONNECT), and the failure reaches the storage monitor.

let db: Db | undefined;
let side: GatewaySide | undefined;
afterEach(async () => {
  await side?.close();
  db?.$client.close();
  side = db = undefined;
});

describe("gateway presence on a full disk", () => {
  it("answers CONNECT with CONNACK 0 when recording the gateway online fails with SQLITE_FULL", async () => {
    db = openDb(":memory:");
    migrateDb(db);
    seedDemo(db, "unit-test-password");
    const gw = await createGateway(db, systemViewer(SERVICE_ORG.id), {
      siteId: "harborview-mob",
      name: "t",
      protocol: "json",
    });
    const failures: unknown[] = [];
    side = await startGatewaySide({
      db,
      config: {
        HOST: "127.0.0.1",
        MQTT_PORT: 0,
        MQTT_URL: undefined,
        MQTT_CLIENT_ID: "liftline-ingest",
        MQTT_USERNAME: undefined,
        MQTT_PASSWORD: undefined,
        INGEST_FLUSH_MS: 5,
        INGEST_MAX_BATCH_ROWS: 5000,
        GATEWAY_MAX_MSGS_PER_S: 500,
        RAW_RETENTION_DAYS: 14,
        ROLLUP_RETENTION_DAYS: 730,
        GATEWAY_CONNECT_WINDOW_S: 300,
        GATEWAY_CONNECT_MAX_PER_GATEWAY: 10,
        GATEWAY_CONNECT_MAX_PER_ADDRESS: 100,
      },
      onCommitted: [],
      storage: { failed: (err) => failures.push(err), committed: () => {} },
      log: () => {},
    });
    // From here on a gateway's state change needs a new page, and none can be added: the same
    // SQLITE_FULL a full disk gives.
    db.$client.exec(`create table filler (b blob);
      create trigger presence_needs_space before update on gateways
      begin insert into filler values (randomblob(100000)); end;`);
    db.$client.pragma("max_page_count = 1");

    const client = mqtt.connect(`mqtt://127.0.0.1:${side.mqttPort}`, {
      protocolVersion: 4,
      // The broker requires the client id to be the gateway id (gateway/PROTOCOL.md).
      clientId: gw.username,
      username: gw.username,
      password: gw.password,
      keepalive: 60,
      reconnectPeriod: 0,
      connectTimeout: 5_000,
    });
    const connack = await new Promise<number | string>((resolve) => {
      client.once("connect", (packet) => resolve(packet.returnCode ?? 0));
      client.once("error", (err) => resolve(String(err)));
      client.once("close", () => resolve("closed without CONNACK"));
    });
    client.end(true);
    expect(connack).toBe(0);
    expect(failures.map((e) => (e as { code?: string }).code)).toContain("SQLITE_FULL");
  });
});
