import Telnyx from "telnyx";

// Sends texts through the provider's official SDK, pointed at the configured API (or the local
// fake). Inbound replies arrive at /api/sms/inbound, verified with the provider's public key by
// the same SDK.

export type SmsOutcome = { ok: true; id: string | null } | { ok: false; detail: string };

export interface SmsSender {
  from: string;
  send(to: string, text: string): Promise<SmsOutcome>;
  /** Verifies an inbound webhook's signature; returns its parsed body or throws. */
  verifyWebhook(rawBody: string, headers: Record<string, string>): Promise<unknown>;
}

export function createSmsSender(opts: {
  apiKey: string;
  baseUrl?: string;
  from: string;
  webhookPublicKey?: string;
}): SmsSender {
  const client = new Telnyx({
    apiKey: opts.apiKey,
    baseURL: opts.baseUrl,
    publicKey: opts.webhookPublicKey,
    maxRetries: 1,
    timeout: 10_000,
  });
  return {
    from: opts.from,
    async send(to, text) {
      try {
        const res = await client.messages.send({ from: opts.from, to, text });
        return { ok: true, id: (res.data as { id?: string } | undefined)?.id ?? null };
      } catch (err) {
        return { ok: false, detail: err instanceof Error ? err.message.slice(0, 200) : String(err) };
      }
    },
    async verifyWebhook(rawBody, headers) {
      return client.webhooks.unwrap(rawBody, { headers });
    },
  };
}
