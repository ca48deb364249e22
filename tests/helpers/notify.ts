import { createECDH, randomBytes, type ECDH } from "node:crypto";
import ece from "http_ece";
import { api } from "./mqtt";
import type { TestServer } from "./server";

// A phone's side of Web Push and texts, for tests: a subscriber's RFC 8291 keys (so the test can
// decrypt what the push service received, as the phone would), and reading the local fakes.

export interface TestSubscriber {
  ecdh: ECDH;
  auth: Buffer;
  keys: { p256dh: string; auth: string };
}

export function newSubscriber(): TestSubscriber {
  const ecdh = createECDH("prime256v1");
  ecdh.generateKeys();
  const auth = randomBytes(16);
  return { ecdh, auth, keys: { p256dh: ecdh.getPublicKey().toString("base64url"), auth: auth.toString("base64url") } };
}

/** Decrypts an aes128gcm Web Push body with the subscriber's private key and auth secret (RFC 8291 §3.4). */
export function decryptPush(sub: TestSubscriber, bodyBase64: string): unknown {
  const plain = ece.decrypt(Buffer.from(bodyBase64, "base64"), {
    version: "aes128gcm",
    privateKey: sub.ecdh,
    authSecret: sub.auth,
  });
  return JSON.parse(plain.toString("utf8"));
}

export interface ReceivedPush {
  subscriptionId: string;
  receivedAtMs: number;
  ttl: number;
  urgency: string | null;
  body: string;
}

export async function pushesReceived(pushSinkUrl: string, endpoint: string): Promise<ReceivedPush[]> {
  const id = endpoint.split("/").pop()!;
  const res = await fetch(`${pushSinkUrl}/_control/received/${id}`);
  return ((await res.json()) as { messages: ReceivedPush[] }).messages;
}

export interface TextMessage {
  id: number;
  direction: "outbound" | "inbound";
  from: string;
  to: string;
  body: string;
  receivedAt: number;
}

export async function texts(server: TestServer, adminCookie: string): Promise<TextMessage[]> {
  const { status, body } = await api(server, adminCookie, "/api/sms-outbox");
  if (status !== 200) throw new Error(`texts: ${status}`);
  return body.messages as TextMessage[];
}

/** A phone replying: the fake SMS API stores it and delivers the signed webhook to Liftline. */
export async function replyText(smsSinkUrl: string, from: string, to: string, text: string) {
  const res = await fetch(`${smsSinkUrl}/_control/inbound`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ from, to, text }),
  });
  return (await res.json()) as {
    webhook: { status: number; body: { acknowledged: boolean; reason?: string; alarmId?: string } };
  };
}
