import { RateLimiterMemory } from "rate-limiter-flexible";

// Failed sign-ins are counted per account and per client address. The account key is the
// typed e-mail whether or not the account exists, so the limiter reveals nothing about it.
export interface SignInLimiterOptions {
  windowS: number;
  maxPerAccount: number;
  maxPerAddress: number;
}

export interface SignInLimiter {
  /** Seconds until the caller may try again, or 0 when an attempt is allowed now. */
  retryAfterS(account: string, address: string): Promise<number>;
  recordFailure(account: string, address: string): Promise<void>;
  recordSuccess(account: string): Promise<void>;
}

export function createSignInLimiter(opts: SignInLimiterOptions): SignInLimiter {
  const byAccount = new RateLimiterMemory({ keyPrefix: "account", points: opts.maxPerAccount, duration: opts.windowS });
  const byAddress = new RateLimiterMemory({ keyPrefix: "address", points: opts.maxPerAddress, duration: opts.windowS });

  async function blockedFor(limiter: RateLimiterMemory, max: number, key: string): Promise<number> {
    const res = await limiter.get(key);
    if (!res || res.consumedPoints < max) return 0;
    return Math.ceil(res.msBeforeNext / 1000);
  }

  return {
    async retryAfterS(account, address) {
      const [a, b] = await Promise.all([
        blockedFor(byAccount, opts.maxPerAccount, account),
        blockedFor(byAddress, opts.maxPerAddress, address),
      ]);
      return Math.max(a, b);
    },
    async recordFailure(account, address) {
      // penalty() never rejects, unlike consume(), so the counter keeps counting past the limit.
      await Promise.all([byAccount.penalty(account, 1), byAddress.penalty(address, 1)]);
    },
    async recordSuccess(account) {
      await byAccount.delete(account);
    },
  };
}
