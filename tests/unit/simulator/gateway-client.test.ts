import net from "node:net";
import { Aedes } from "aedes";
import mqtt from "mqtt";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startSimulatedGateway, type SimulatedGateway } from "@/simulator/gateway-client";
import { pointMapRows, siteLayouts } from "@/simulator";

// Publishes over a real (in-process) MQTT broker and checks the Liftline JSON contract and command handling.
let broker: Awaited<ReturnType<typeof Aedes.createBroker>>;
let server: net.Server;
let port = 0;

beforeAll(async () => {
  broker = await Aedes.createBroker();
  server = net.createServer(broker.handle);
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", () => r()));
  port = (server.address() as net.AddressInfo).port;
});
afterAll(async () => {
  await new Promise<void>((r) => server.close(() => r()));
  await new Promise<void>((r) => broker.close(() => r()));
});

describe("simulated gateway over MQTT", () => {
  it("publishes readings with seq/sentAt/point/value/ts/quality, retained status, and applies a drill command", async () => {
    const url = `mqtt://127.0.0.1:${port}`;
    const sub = await mqtt.connectAsync(url, { clientId: "test-sub" });
    const messages: Array<{
      seq: number;
      sentAt: string;
      readings: Array<{ point: string; value: unknown; ts: string; quality: string }>;
    }> = [];
    const status: string[] = [];
    sub.on("message", (topic, payload) => {
      if (topic.endsWith("/readings")) messages.push(JSON.parse(payload.toString()));
      if (topic.endsWith("/status")) status.push(payload.toString());
    });
    await sub.subscribeAsync(["liftline/gw-test/readings", "liftline/gw-test/status"], { qos: 1 });

    const events: string[] = [];
    const gw: SimulatedGateway = startSimulatedGateway({
      mqttUrl: url,
      username: "gw-test",
      password: "x",
      scenario: "power-blip",
      speed: 600,
      seed: 7,
      siteLayout: "medical-office",
      durationS: 3 * 3600,
      onEvent: (e) => events.push(`${e.kind}: ${e.message}`),
    });
    const deadline = Date.now() + 15_000;
    while (messages.length < 3 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
    await sub.publishAsync(
      "liftline/gw-test/commands",
      JSON.stringify({
        id: "c1",
        action: { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "stop-to-start", seconds: 5 },
      }),
      { qos: 1 },
    );
    await sub.publishAsync(
      "liftline/gw-test/commands",
      JSON.stringify({ type: "set-fan-drive-mode", equipment: "CT-1", mode: "hand", handHz: 60 }),
      { qos: 1 },
    );
    await sub.publishAsync("liftline/gw-test/commands", "{not json", { qos: 1 });
    while (events.filter((e) => /action/.test(e) || /Command refused/.test(e)).length < 3 && Date.now() < deadline)
      await new Promise((r) => setTimeout(r, 50));
    const st = gw.status();
    await gw.stop();
    await sub.endAsync();

    expect(status[0]).toBe("online");
    expect(messages.length).toBeGreaterThanOrEqual(3);
    const m = messages[0];
    expect(typeof m.seq).toBe("number");
    expect(messages[1].seq).toBe(m.seq + 1);
    expect(Number.isNaN(Date.parse(m.sentAt))).toBe(false);
    const points = new Set(pointMapRows(siteLayouts["medical-office"]).map((r) => r.gateway_point));
    for (const r of m.readings) {
      expect(points.has(r.point)).toBe(true);
      expect(r.quality).toBe("good");
      expect(Date.parse(r.ts)).toBeLessThanOrEqual(Date.now());
    }
    expect(events.some((e) => /action-refused: .*outside the controller limits 60–1800 s/.test(e))).toBe(true);
    expect(events.some((e) => /^action: .*set fan drive mode hand/.test(e))).toBe(true);
    expect(events.some((e) => /Command refused: not JSON/.test(e))).toBe(true);
    expect(st.fractionDone).toBeGreaterThan(0);
    expect(st.gatewayId).toBe("gw-test");
  }, 30_000);
});
