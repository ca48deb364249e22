import type { HashGate } from "./credential-hash";

// Failed MQTT CONNECTs counted per user name and per remote address. Over either limit an
// attempt is refused (CONNACK 5) before its password is hashed. The gate is asked again just
// before the hash, so a burst of attempts queued at once is cut off at the limit too.
//
// Refused attempts are not counted, so a gateway retrying with a stale password adds at most
// maxPerGateway failures a window to its address: the other gateways of a site behind one NAT
// address are shut out only when many user names fail there at once. A gateway whose password
// already matched in this process is admitted without a hash and without asking the limiter
// (gateway/credential-hash.ts), so others' failures never shut out a gateway that is working.
//
// Counted here rather than with rate-limiter-flexible (as sign-in is): its answers are promises,
// and a reconnect storm asks twice per CONNECT on the event loop, where every promise counts.

export interface ConnectLimiterOptions {
  windowS: number;
  maxPerGateway: number;
  maxPerAddress: number;
  now?: () => number;
}

export interface ConnectLimiter {
  /** The gate for one CONNECT; without an address only the user name is limited. */
  gate(username: string, address: string | undefined): HashGate;
}

/** User names are short gateway ids; a long one must not cost memory for a whole window. */
const KEY_CHARS = 64;

/** Failures per key in a fixed window that starts at the key's first failure. */
function failureCounter(max: number, windowMs: number, now: () => number) {
  const counts = new Map<string, { n: number; until: number }>();
  const live = (key: string, t: number) => {
    const c = counts.get(key);
    if (!c || c.until > t) return c;
    counts.delete(key);
    return undefined;
  };
  // Keys nobody asks about again are dropped once their window is over.
  const sweep = setInterval(() => {
    const t = now();
    for (const [key, c] of counts) if (c.until <= t) counts.delete(key);
  }, windowMs);
  sweep.unref();
  return {
    over: (key: string) => (live(key, now())?.n ?? 0) >= max,
    add(key: string) {
      const t = now();
      const c = live(key, t);
      if (c) c.n++;
      else counts.set(key, { n: 1, until: t + windowMs });
    },
    clear: (key: string) => counts.delete(key),
  };
}

export function createConnectLimiter(opts: ConnectLimiterOptions): ConnectLimiter {
  const now = opts.now ?? Date.now;
  const byGateway = failureCounter(opts.maxPerGateway, opts.windowS * 1000, now);
  const byAddress = failureCounter(opts.maxPerAddress, opts.windowS * 1000, now);
  return {
    gate(username, address) {
      const user = username.slice(0, KEY_CHARS);
      return {
        mayHash: () => !byGateway.over(user) && (address === undefined || !byAddress.over(address)),
        settled(admitted) {
          if (admitted) {
            byGateway.clear(user);
            return;
          }
          byGateway.add(user);
          if (address !== undefined) byAddress.add(address);
        },
      };
    },
  };
}
