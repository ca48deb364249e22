import { createPublicKey, randomUUID, verify } from "node:crypto";
import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";

// A local stand-in for a browser vendor's push service, on loopback, for development and tests.
// It takes a push request as RFC 8030 §5 describes it and checks what a real one checks: the
// VAPID header (RFC 8292 §2–3: an ES256 JWT whose audience is this origin, expiring within 24 h,
// with a contact subject, signed by the key in `k`), the aes128gcm body (RFC 8188 §2.1 header
// with the sender's P-256 key as keyid, RFC 8291 §4) and the TTL header; it answers 201 with the
// message's Location. It cannot decrypt (only the subscriber holds the keys); it keeps what it
// received so tests can. `/_control/gone/{id}` makes an endpoint answer 410 (unsubscribed).

export interface ReceivedPush {
  subscriptionId: string;
  receivedAtMs: number;
  ttl: number;
  urgency: string | null;
  /** The encrypted body, base64. */
  body: string;
}

export interface FakePushService {
  port: number;
  origin: string;
  /** An endpoint URL on this service for a new subscription. */
  newEndpoint(): string;
  received(subscriptionId?: string): ReceivedPush[];
  close(): Promise<void>;
}

const MAX_BODY = 4096; // RFC 8030 §7.2: a push service must accept at least this; larger may get 413
const MAX_KEPT = 2000;

const b64url = (s: string) => Buffer.from(s, "base64url");

function checkVapid(header: string | undefined, origin: string, nowS: number): string | null {
  if (!header) return "missing Authorization";
  const m = /^vapid\s+(.+)$/i.exec(header);
  if (!m) return "Authorization is not the vapid scheme";
  const params = new Map(
    m[1].split(",").map((p) => {
      const i = p.indexOf("=");
      return [p.slice(0, i).trim().toLowerCase(), p.slice(i + 1).trim()] as const;
    }),
  );
  const jwt = params.get("t");
  const k = params.get("k");
  if (!jwt || !k) return "vapid needs t and k";
  const key = b64url(k);
  if (key.length !== 65 || key[0] !== 0x04) return "k is not an uncompressed P-256 point";
  const parts = jwt.split(".");
  if (parts.length !== 3) return "t is not a JWT";
  let head: { alg?: string; typ?: string };
  let claims: { aud?: string; exp?: number; sub?: string };
  try {
    head = JSON.parse(b64url(parts[0]).toString("utf8"));
    claims = JSON.parse(b64url(parts[1]).toString("utf8"));
  } catch {
    return "t is not a JWT";
  }
  if (head.alg !== "ES256") return "JWT alg must be ES256 (RFC 8292 §2)";
  if (claims.aud !== origin) return `JWT aud ${claims.aud} is not this push service's origin ${origin}`;
  if (typeof claims.exp !== "number" || claims.exp <= nowS) return "JWT expired";
  if (claims.exp > nowS + 24 * 3600) return "JWT exp more than 24 h ahead (RFC 8292 §2)";
  if (claims.sub && !/^(mailto:|https:)/.test(claims.sub)) return "JWT sub must be a mailto: or https: URI";
  const publicKey = createPublicKey({
    key: {
      kty: "EC",
      crv: "P-256",
      x: key.subarray(1, 33).toString("base64url"),
      y: key.subarray(33).toString("base64url"),
    },
    format: "jwk",
  });
  const ok = verify(
    "sha256",
    Buffer.from(`${parts[0]}.${parts[1]}`),
    { key: publicKey, dsaEncoding: "ieee-p1363" },
    b64url(parts[2]),
  );
  return ok ? null : "JWT signature does not verify";
}

/** The RFC 8188 header of an aes128gcm body: salt(16) rs(4) idlen(1) keyid; Web Push puts the sender's key there. */
function checkAes128gcm(body: Buffer): string | null {
  if (body.length < 21 + 65 + 17) return "body too short for aes128gcm";
  const rs = body.readUInt32BE(16);
  const idlen = body[20];
  if (rs < 18) return "record size too small (RFC 8188 §2)";
  if (idlen !== 65 || body[21] !== 0x04) return "keyid must be the sender's uncompressed P-256 key (RFC 8291 §4)";
  return null;
}

export async function startFakePushService(opts: {
  port: number;
  log?: (line: string) => void;
}): Promise<FakePushService> {
  const gone = new Set<string>();
  let received: ReceivedPush[] = [];
  let origin = "";

  const send = (res: ServerResponse, status: number, body?: unknown, headers: Record<string, string> = {}) => {
    res.writeHead(status, { "content-type": "application/json", ...headers });
    res.end(body === undefined ? undefined : JSON.stringify(body));
  };

  async function readBody(req: IncomingMessage, limit: number): Promise<Buffer | null> {
    const chunks: Buffer[] = [];
    let size = 0;
    for await (const chunk of req) {
      size += (chunk as Buffer).length;
      if (size > limit) return null;
      chunks.push(chunk as Buffer);
    }
    return Buffer.concat(chunks);
  }

  async function handle(req: IncomingMessage, res: ServerResponse) {
    const url = new URL(req.url ?? "/", origin);
    const push = /^\/push\/([A-Za-z0-9_-]{8,64})$/.exec(url.pathname);
    if (push && req.method === "POST") {
      const id = push[1];
      const body = await readBody(req, MAX_BODY);
      if (body === null) return send(res, 413, { error: "payload too large" });
      if (gone.has(id)) return send(res, 410, { error: "subscription is gone" });
      const vapidError = checkVapid(req.headers.authorization, origin, Math.floor(Date.now() / 1000));
      if (vapidError) return send(res, 401, { error: vapidError });
      const ttl = Number(req.headers.ttl);
      if (req.headers.ttl === undefined || !Number.isInteger(ttl) || ttl < 0)
        return send(res, 400, { error: "TTL header required (RFC 8030 §5.2)" });
      const urgency = (req.headers.urgency as string | undefined) ?? null;
      if (urgency && !["very-low", "low", "normal", "high"].includes(urgency))
        return send(res, 400, { error: "bad Urgency (RFC 8030 §5.3)" });
      if (body.length > 0) {
        if (req.headers["content-encoding"] !== "aes128gcm")
          return send(res, 415, { error: "Content-Encoding must be aes128gcm (RFC 8291)" });
        const encError = checkAes128gcm(body);
        if (encError) return send(res, 400, { error: encError });
      }
      received.push({ subscriptionId: id, receivedAtMs: Date.now(), ttl, urgency, body: body.toString("base64") });
      if (received.length > MAX_KEPT) received = received.slice(-MAX_KEPT);
      return send(res, 201, undefined, { location: `${origin}/message/${randomUUID()}` });
    }
    const control = /^\/_control\/(gone|received)(?:\/([A-Za-z0-9_-]{8,64}))?$/.exec(url.pathname);
    if (control?.[1] === "gone" && control[2] && req.method === "POST") {
      gone.add(control[2]);
      return send(res, 204);
    }
    if (control?.[1] === "received" && req.method === "GET")
      return send(res, 200, { messages: received.filter((m) => !control[2] || m.subscriptionId === control[2]) });
    send(res, 404, { error: "not found" });
  }

  const server: Server = createServer((req, res) => {
    handle(req, res).catch((err: unknown) => {
      opts.log?.(`[push sink] ${String(err)}`);
      if (!res.headersSent) send(res, 500, { error: "internal" });
    });
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, "127.0.0.1", () => resolve());
  });
  const address = server.address();
  const port = typeof address === "object" && address ? address.port : opts.port;
  origin = `http://127.0.0.1:${port}`;
  return {
    port,
    origin,
    newEndpoint: () => `${origin}/push/${randomUUID().replaceAll("-", "")}`,
    received: (id) => received.filter((m) => !id || m.subscriptionId === id),
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
