import net from "node:net";
import { io } from "socket.io-client";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { api } from "../helpers/mqtt";
import { signIn, startServer, type TestServer } from "../helpers/server";

// Per-caller rate limits on writes and trends, and HTTP connection timeouts, against the real server
// with small configured values.

let server: TestServer;
const cookies: Record<string, string> = {};
let pointId: number;
const WRITES = 3;
const TRENDS = 4;
const HEADERS_TIMEOUT_MS = 1000;
const REQUEST_TIMEOUT_MS = 2000;
const KEEP_ALIVE_TIMEOUT_MS = 1000;

beforeAll(async () => {
  server = await startServer({
    env: {
      API_WRITES_PER_MIN: String(WRITES),
      API_TRENDS_PER_MIN: String(TRENDS),
      HTTP_HEADERS_TIMEOUT_MS: String(HEADERS_TIMEOUT_MS),
      HTTP_REQUEST_TIMEOUT_MS: String(REQUEST_TIMEOUT_MS),
      HTTP_KEEP_ALIVE_TIMEOUT_MS: String(KEEP_ALIVE_TIMEOUT_MS),
    },
  });
  for (const [who, email] of Object.entries({
    tech: "luis@tallgrass.example",
    admin: "admin@tallgrass.example",
    owner: "facilities@harborview.example",
  }))
    cookies[who] = (await signIn(server.url, email)).cookie!;
  const { body } = await api(server, cookies.owner, "/api/sites/harborview-mob");
  pointId = body.site.equipment[0].points[0].id;
});
afterAll(() => server?.stop());

const createToken = (auth: { cookie: string } | { bearer: string }, name: string) =>
  fetch(`${server.url}/api/tokens`, {
    method: "POST",
    headers: {
      "content-type": "application/json",
      ...("cookie" in auth ? { cookie: auth.cookie, origin: server.url } : { authorization: `Bearer ${auth.bearer}` }),
    },
    body: JSON.stringify({ name }),
  });

const trend = (cookie: string) => fetch(`${server.url}/api/points/${pointId}/series`, { headers: { cookie } });

/** 429 with a Retry-After of whole seconds within the one-minute window (RFC 6585 §4, RFC 9110 §10.2.3). */
async function expectTooMany(res: Response) {
  expect(res.status).toBe(429);
  const retryAfter = res.headers.get("retry-after");
  expect(retryAfter).toMatch(/^\d+$/);
  expect(Number(retryAfter)).toBeGreaterThan(0);
  expect(Number(retryAfter)).toBeLessThanOrEqual(60);
  expect((await res.json()).error.code).toBe("rate_limited");
}

describe("API rate limits", () => {
  it("answer 429 with Retry-After once a session has used its writes; another user is unaffected", async () => {
    for (let i = 0; i < WRITES; i++) expect((await createToken({ cookie: cookies.tech }, `t${i}`)).status).toBe(201);
    await expectTooMany(await createToken({ cookie: cookies.tech }, "one too many"));
    const { body } = await api(server, cookies.tech, "/api/tokens");
    expect(body.tokens.map((t: { name: string }) => t.name)).not.toContain("one too many");
    expect((await createToken({ cookie: cookies.owner }, "other user")).status).toBe(201);
  });

  it("count an API token apart from its owner's session", async () => {
    const created = await createToken({ cookie: cookies.admin }, "script");
    const { token } = await created.json();
    for (let i = 1; i <= WRITES; i++) expect((await createToken({ bearer: token }, `s${i}`)).status).toBe(201);
    await expectTooMany(await createToken({ bearer: token }, "one too many"));
    expect((await createToken({ cookie: cookies.admin }, "by hand")).status).toBe(201);
  });

  it("limit trend requests per session, apart from writes", async () => {
    for (let i = 0; i < TRENDS; i++) {
      const res = await trend(cookies.tech);
      expect(res.status).toBe(200);
      await res.arrayBuffer();
    }
    await expectTooMany(await trend(cookies.tech));
    expect((await trend(cookies.owner)).status).toBe(200);
  });
});

/**
 * Opens a raw TCP connection, sends `data`, and resolves with what came back and how long the server
 * kept the connection open, counted from the connect or, for a kept-alive one, from the response.
 */
function holdConnection(
  data: string,
  from: "connect" | "response" = "connect",
): Promise<{ closedAfterMs: number; received: string }> {
  return new Promise((resolve, reject) => {
    const socket = net.connect(server.port, "127.0.0.1");
    let received = "";
    let start = 0;
    const giveUp = setTimeout(() => {
      socket.destroy();
      reject(new Error(`still open after 15 s; received: ${JSON.stringify(received)}`));
    }, 15_000);
    socket.on("connect", () => {
      start = Date.now();
      if (data) socket.write(data);
    });
    socket.on("data", (d) => {
      received += d.toString();
      if (from === "response" && received.includes("\r\n\r\n")) start = Date.now();
    });
    socket.on("error", () => {});
    socket.on("close", () => {
      clearTimeout(giveUp);
      resolve({ closedAfterMs: Date.now() - start, received });
    });
  });
}

describe("HTTP connection timeouts (CWE-400; Node.js http: server.headersTimeout, requestTimeout, keepAliveTimeout)", () => {
  // Node checks the headers and request timeouts once a second here (connectionsCheckingInterval).
  const SLACK_MS = 2500;

  it("close a connection that sends nothing", async () => {
    const { closedAfterMs } = await holdConnection("");
    expect(closedAfterMs).toBeGreaterThanOrEqual(HEADERS_TIMEOUT_MS - 100);
    expect(closedAfterMs).toBeLessThan(HEADERS_TIMEOUT_MS + SLACK_MS);
  });

  it("close a connection whose headers never end, with 408", async () => {
    const { closedAfterMs, received } = await holdConnection("GET /api/health HTTP/1.1\r\nHost: localhost\r\n");
    expect(closedAfterMs).toBeLessThan(HEADERS_TIMEOUT_MS + SLACK_MS);
    expect(received).toMatch(/^HTTP\/1\.1 408/);
  });

  it("close a connection whose body never arrives in full", async () => {
    const { closedAfterMs } = await holdConnection(
      "POST /api/tokens HTTP/1.1\r\nHost: localhost\r\nContent-Type: application/json\r\nContent-Length: 100\r\n\r\n{",
    );
    expect(closedAfterMs).toBeGreaterThanOrEqual(REQUEST_TIMEOUT_MS - 100);
    expect(closedAfterMs).toBeLessThan(REQUEST_TIMEOUT_MS + SLACK_MS);
  });

  it("close an idle kept-alive connection after its response", async () => {
    const { closedAfterMs, received } = await holdConnection(
      "GET /api/health HTTP/1.1\r\nHost: localhost\r\nConnection: keep-alive\r\n\r\n",
      "response",
    );
    expect(received).toMatch(/^HTTP\/1\.1 200/);
    expect(closedAfterMs).toBeLessThan(KEEP_ALIVE_TIMEOUT_MS + SLACK_MS);
  });

  it("leave a socket.io WebSocket open well past them", async () => {
    const socket = io(server.url, {
      extraHeaders: { cookie: cookies.tech, origin: server.url },
      transports: ["websocket"],
      reconnection: false,
    });
    await new Promise<void>((resolve, reject) => {
      socket.once("connect", () => resolve());
      socket.once("connect_error", reject);
    });
    let disconnected = false;
    socket.on("disconnect", () => (disconnected = true));
    await new Promise((r) => setTimeout(r, REQUEST_TIMEOUT_MS + SLACK_MS + 1000));
    expect(disconnected).toBe(false);
    expect(await socket.emitWithAck("site:join", { siteId: "harborview-mob" })).toEqual({
      data: { siteId: "harborview-mob" },
    });
    socket.disconnect();
  });
});
