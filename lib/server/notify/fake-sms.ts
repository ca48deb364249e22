import { generateKeyPairSync, randomUUID, sign, type KeyObject } from "node:crypto";
import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";
import { z } from "zod";
import type { Db } from "@/db/client";
import { storeSmsSinkMessage } from "@/db/queries/notify";

// A local stand-in for the SMS provider's HTTP API, on loopback, used when no provider is
// configured (SMS_API_KEY unset). It answers the SDK's "send a message" call as the provider
// does (bearer key, JSON in, the message resource out) and stores every message for the admin's
// Texts page. A phone's reply is simulated through `/_control/inbound`: it is stored and then
// delivered to Liftline's webhook signed with Ed25519 over "timestamp|body", the scheme the
// SDK's webhook verifier checks, so the inbound route runs exactly as it would in production.

/** The webhook signature headers the SDK's verifier reads (its names, not ours). */
export const WEBHOOK_SIGNATURE_HEADER = ["telnyx", "signature", "ed25519"].join("-");
export const WEBHOOK_TIMESTAMP_HEADER = ["telnyx", "timestamp"].join("-");

export interface FakeSmsApi {
  port: number;
  /** The base URL the SDK is pointed at. */
  baseUrl: string;
  apiKey: string;
  /** Base64 raw Ed25519 public key the webhook route verifies with. */
  webhookPublicKey: string;
  close(): Promise<void>;
}

const sendSchema = z.object({
  from: z.string().regex(/^\+[1-9]\d{6,14}$/),
  to: z.string().regex(/^\+[1-9]\d{6,14}$/),
  text: z.string().min(1).max(1600),
});
const inboundSchema = sendSchema;

function rawPublicKey(key: KeyObject): string {
  // The SPKI DER of an Ed25519 key ends with its 32 raw bytes (RFC 8410 §4).
  return key.export({ format: "der", type: "spki" }).subarray(-32).toString("base64");
}

export async function startFakeSmsApi(opts: {
  db: Db;
  port: number;
  /** Where inbound messages are delivered (Liftline's own webhook route). */
  webhookUrl: string;
  log?: (line: string) => void;
}): Promise<FakeSmsApi> {
  const apiKey = `KEY${randomUUID().replaceAll("-", "")}`;
  const { publicKey, privateKey } = generateKeyPairSync("ed25519");

  const send = (res: ServerResponse, status: number, body?: unknown) => {
    res.writeHead(status, { "content-type": "application/json" });
    res.end(body === undefined ? undefined : JSON.stringify(body));
  };
  const error = (res: ServerResponse, status: number, title: string, detail: string) =>
    send(res, status, { errors: [{ code: String(status * 100), title, detail }] });

  async function readJsonBody(req: IncomingMessage): Promise<{ raw: string; json: unknown } | null> {
    let raw = "";
    for await (const chunk of req) {
      raw += chunk;
      if (raw.length > 64 * 1024) return null;
    }
    try {
      return { raw, json: JSON.parse(raw) };
    } catch {
      return null;
    }
  }

  async function deliverInbound(m: z.infer<typeof inboundSchema>) {
    const body = JSON.stringify({
      data: {
        event_type: "message.received",
        id: randomUUID(),
        occurred_at: new Date().toISOString(),
        record_type: "event",
        payload: {
          id: randomUUID(),
          direction: "inbound",
          type: "SMS",
          from: { phone_number: m.from },
          to: [{ phone_number: m.to }],
          text: m.text,
        },
      },
    });
    const ts = String(Math.floor(Date.now() / 1000));
    const signature = sign(null, Buffer.from(`${ts}|${body}`), privateKey).toString("base64");
    const res = await fetch(opts.webhookUrl, {
      method: "POST",
      headers: {
        "content-type": "application/json",
        [WEBHOOK_SIGNATURE_HEADER]: signature,
        [WEBHOOK_TIMESTAMP_HEADER]: ts,
      },
      body,
      signal: AbortSignal.timeout(10_000),
    });
    return { status: res.status, body: (await res.json().catch(() => null)) as unknown };
  }

  async function handle(req: IncomingMessage, res: ServerResponse) {
    const path = new URL(req.url ?? "/", "http://x").pathname.replace(/\/+$/, "");
    if (req.method === "POST" && path === "/v2/messages") {
      if (req.headers.authorization !== `Bearer ${apiKey}`)
        return error(res, 401, "Authentication failed", "The API key is missing or wrong.");
      const body = await readJsonBody(req);
      const parsed = sendSchema.safeParse(body?.json);
      if (!parsed.success) return error(res, 422, "Invalid parameter", parsed.error.issues[0]?.message ?? "invalid");
      storeSmsSinkMessage(opts.db, {
        direction: "outbound",
        from: parsed.data.from,
        to: parsed.data.to,
        body: parsed.data.text,
      });
      return send(res, 200, {
        data: {
          record_type: "message",
          id: randomUUID(),
          direction: "outbound",
          type: "SMS",
          from: { phone_number: parsed.data.from },
          to: [{ phone_number: parsed.data.to, status: "queued" }],
          text: parsed.data.text,
          parts: Math.ceil(parsed.data.text.length / 153) || 1,
        },
      });
    }
    if (req.method === "POST" && path === "/_control/inbound") {
      const body = await readJsonBody(req);
      const parsed = inboundSchema.safeParse(body?.json);
      if (!parsed.success) return error(res, 422, "Invalid parameter", "from, to and text are required");
      storeSmsSinkMessage(opts.db, {
        direction: "inbound",
        from: parsed.data.from,
        to: parsed.data.to,
        body: parsed.data.text,
      });
      const delivered = await deliverInbound(parsed.data);
      return send(res, 200, { webhook: delivered });
    }
    error(res, 404, "Not found", "No such resource.");
  }

  const server: Server = createServer((req, res) => {
    handle(req, res).catch((err: unknown) => {
      opts.log?.(`[sms sink] ${String(err)}`);
      if (!res.headersSent) error(res, 500, "Internal", "internal");
    });
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, "127.0.0.1", () => resolve());
  });
  const address = server.address();
  const port = typeof address === "object" && address ? address.port : opts.port;
  return {
    port,
    baseUrl: `http://127.0.0.1:${port}/v2`,
    apiKey,
    webhookPublicKey: rawPublicKey(publicKey),
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
