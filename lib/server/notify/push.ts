import webpush from "web-push";
import type { PushPayload } from "@/lib/notify/messages";
import type { VapidKeys } from "./vapid";

// Sends one Web Push message: web-push encrypts the payload (RFC 8291, aes128gcm) and signs the
// VAPID header (RFC 8292); the request itself goes out through fetch, which also speaks plain
// HTTP to the local fake push service on loopback (web-push's own sender is HTTPS-only).

export interface PushSubscriptionKeys {
  endpoint: string;
  p256dh: string;
  auth: string;
}

export type PushOutcome =
  | { ok: true; status: number; location: string | null }
  | { ok: false; status: number | null; gone: boolean; detail: string };

/** Alarms are urgent and stale after a while: the push service may drop them after this (RFC 8030 §5.2). */
export const PUSH_TTL_S = 3600;
const SEND_TIMEOUT_MS = 10_000;

export function createPushSender(opts: { vapid: VapidKeys; subject: string }) {
  return async function sendPush(sub: PushSubscriptionKeys, payload: PushPayload): Promise<PushOutcome> {
    let details: webpush.RequestDetails;
    try {
      details = webpush.generateRequestDetails(
        { endpoint: sub.endpoint, keys: { p256dh: sub.p256dh, auth: sub.auth } },
        JSON.stringify(payload),
        {
          vapidDetails: { subject: opts.subject, publicKey: opts.vapid.publicKey, privateKey: opts.vapid.privateKey },
          TTL: PUSH_TTL_S,
          urgency: "high",
          contentEncoding: "aes128gcm",
        },
      );
    } catch (err) {
      return { ok: false, status: null, gone: false, detail: `not sent: ${(err as Error).message}` };
    }
    try {
      const res = await fetch(details.endpoint, {
        method: "POST",
        headers: details.headers as Record<string, string>,
        body: details.body ? new Uint8Array(details.body) : undefined,
        signal: AbortSignal.timeout(SEND_TIMEOUT_MS),
        redirect: "error",
      });
      await res.arrayBuffer().catch(() => undefined);
      if (res.status >= 200 && res.status < 300)
        return { ok: true, status: res.status, location: res.headers.get("location") };
      // 404 and 410: the subscription expired or was unsubscribed (RFC 8030 §7.3).
      return {
        ok: false,
        status: res.status,
        gone: res.status === 404 || res.status === 410,
        detail: `push service answered ${res.status}`,
      };
    } catch (err) {
      return { ok: false, status: null, gone: false, detail: `push service unreachable: ${(err as Error).message}` };
    }
  };
}

export type PushSender = ReturnType<typeof createPushSender>;
