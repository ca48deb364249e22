import { beforeEach, describe, expect, it, vi } from "vitest";
import { migrateDb, openDb } from "@/db/client";
import { createGateway } from "@/db/queries/gateways";
import { SERVICE_ORG, seedDemo } from "@/db/seed/demo";
import { createGatewayAuth } from "@/gateway/auth";
import { createConnectLimiter } from "@/gateway/connect-limiter";
import { CHECK_THREADS, checkOnWorker } from "@/gateway/credential-pool";
import { systemViewer } from "@/lib/auth/viewer";

// Failed CONNECTs limited per gateway user name and per remote address; over the limit the
// broker answers CONNACK 5 (MQTT 3.1.1 §3.2.2.3 "not authorized") without hashing anything.

vi.mock("@/gateway/credential-pool", async (importOriginal) => {
  const actual = await importOriginal<typeof import("@/gateway/credential-pool")>();
  return { ...actual, checkOnWorker: vi.fn(actual.checkOnWorker) };
});
const hashes = () => vi.mocked(checkOnWorker).mock.calls.length;

async function setup(limits: { maxPerGateway: number; maxPerAddress: number; now?: () => number }) {
  const db = openDb(":memory:");
  migrateDb(db);
  seedDemo(db, "unit-test-password");
  const viewer = systemViewer(SERVICE_ORG.id);
  const gateways = [];
  for (let i = 0; i < 3; i++)
    gateways.push(await createGateway(db, viewer, { siteId: "harborview-mob", name: `gw ${i}`, protocol: "json" }));
  const auth = createGatewayAuth({
    db,
    internal: { username: "internal", password: "internal-password" },
    limiter: createConnectLimiter({ windowS: 60, ...limits }),
  });
  vi.mocked(checkOnWorker).mockClear();
  return { auth, gateways };
}

beforeEach(() => {
  vi.mocked(checkOnWorker).mockClear();
});

describe("connect limiter", () => {
  it("refuses a gateway after its failures, without a hash, even with the right password", async () => {
    const { auth, gateways } = await setup({ maxPerGateway: 3, maxPerAddress: 100 });
    const [gw] = gateways;
    for (let i = 0; i < 3; i++)
      expect(
        await auth.authenticate({
          clientId: gw.username,
          username: gw.username,
          password: "wrong",
          address: "10.0.0.1",
        }),
      ).toBe("bad_credentials");
    expect(hashes()).toBe(3);
    expect(
      await auth.authenticate({
        clientId: gw.username,
        username: gw.username,
        password: gw.password,
        address: "10.0.0.2",
      }),
    ).toBe("not_authorized");
    expect(
      await auth.authenticate({ clientId: gw.username, username: gw.username, password: "wrong", address: "10.0.0.2" }),
    ).toBe("not_authorized");
    expect(hashes()).toBe(3);
    // Another gateway at the same address is not affected by this one's limit.
    expect(
      await auth.authenticate({
        clientId: gateways[1].username,
        username: gateways[1].username,
        password: gateways[1].password,
        address: "10.0.0.1",
      }),
    ).toMatchObject({
      kind: "gateway",
      gatewayId: gateways[1].gateway.id,
    });
  });

  it("refuses an address that tried many user names, known or not, and lets it in after the window", async () => {
    let nowMs = 1_000_000;
    const { auth, gateways } = await setup({ maxPerGateway: 100, maxPerAddress: 4, now: () => nowMs });
    for (let i = 0; i < 4; i++)
      expect(
        await auth.authenticate({
          clientId: `gw-unknown${i}`,
          username: `gw-unknown${i}`,
          password: "guess",
          address: "10.0.0.9",
        }),
      ).toBe("bad_credentials");
    expect(
      await auth.authenticate({
        clientId: gateways[0].username,
        username: gateways[0].username,
        password: gateways[0].password,
        address: "10.0.0.9",
      }),
    ).toBe("not_authorized");
    expect(hashes()).toBe(4);
    // The same gateway from elsewhere, and a CONNECT whose address is not known, are let in.
    expect(
      await auth.authenticate({
        clientId: gateways[0].username,
        username: gateways[0].username,
        password: gateways[0].password,
        address: "10.0.0.10",
      }),
    ).toMatchObject({ kind: "gateway" });
    expect(
      await auth.authenticate({
        clientId: gateways[1].username,
        username: gateways[1].username,
        password: gateways[1].password,
      }),
    ).toMatchObject({ kind: "gateway" });
    // The window (60 s here) runs from the address's first failure.
    nowMs += 59_999;
    expect(
      await auth.authenticate({
        clientId: gateways[2].username,
        username: gateways[2].username,
        password: gateways[2].password,
        address: "10.0.0.9",
      }),
    ).toBe("not_authorized");
    nowMs += 1;
    expect(
      await auth.authenticate({
        clientId: gateways[2].username,
        username: gateways[2].username,
        password: gateways[2].password,
        address: "10.0.0.9",
      }),
    ).toMatchObject({
      kind: "gateway",
    });
  });

  it("admits a gateway whose password already matched, from an address over its limit", async () => {
    const { auth, gateways } = await setup({ maxPerGateway: 100, maxPerAddress: 2 });
    const [gw] = gateways;
    expect(
      await auth.authenticate({
        clientId: gw.username,
        username: gw.username,
        password: gw.password,
        address: "10.0.1.1",
      }),
    ).toMatchObject({
      kind: "gateway",
    });
    for (let i = 0; i < 2; i++)
      await auth.authenticate({
        clientId: `gw-unknown${i}`,
        username: `gw-unknown${i}`,
        password: "guess",
        address: "10.0.1.1",
      });
    vi.mocked(checkOnWorker).mockClear();
    expect(
      await auth.authenticate({
        clientId: gw.username,
        username: gw.username,
        password: gw.password,
        address: "10.0.1.1",
      }),
    ).toMatchObject({
      kind: "gateway",
    });
    expect(hashes()).toBe(0);
    expect(
      await auth.authenticate({
        clientId: gateways[1].username,
        username: gateways[1].username,
        password: gateways[1].password,
        address: "10.0.1.1",
      }),
    ).toBe("not_authorized");
  });

  it("clears a gateway's failures when it gets in", async () => {
    const { auth, gateways } = await setup({ maxPerGateway: 2, maxPerAddress: 100 });
    const [gw] = gateways;
    expect(
      await auth.authenticate({ clientId: gw.username, username: gw.username, password: "wrong", address: "10.0.2.1" }),
    ).toBe("bad_credentials");
    expect(
      await auth.authenticate({
        clientId: gw.username,
        username: gw.username,
        password: gw.password,
        address: "10.0.2.1",
      }),
    ).toMatchObject({
      kind: "gateway",
    });
    expect(
      await auth.authenticate({ clientId: gw.username, username: gw.username, password: "wrong", address: "10.0.2.1" }),
    ).toBe("bad_credentials");
    expect(
      await auth.authenticate({
        clientId: gw.username,
        username: gw.username,
        password: gw.password,
        address: "10.0.2.1",
      }),
    ).toMatchObject({
      kind: "gateway",
    });
  });

  it("cuts a burst of attempts arriving at once off at the limit, give or take the checks in progress", async () => {
    const { auth, gateways } = await setup({ maxPerGateway: 5, maxPerAddress: 1000 });
    const results = await Promise.all(
      Array.from({ length: 40 }, () =>
        auth.authenticate({
          clientId: gateways[0].username,
          username: gateways[0].username,
          password: "wrong",
          address: "10.0.3.1",
        }),
      ),
    );
    const hashed = results.filter((r) => r === "bad_credentials").length;
    expect(hashed).toBe(hashes());
    expect(hashed).toBeGreaterThanOrEqual(5);
    // One running and one queued per check thread (gateway/credential-hash.ts).
    expect(hashed).toBeLessThanOrEqual(5 + 2 * CHECK_THREADS);
    expect(results.filter((r) => r === "not_authorized").length).toBe(40 - hashed);
  });
});
