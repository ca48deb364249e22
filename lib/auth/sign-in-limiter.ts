// Failed sign-ins slow an account down instead of locking it, so nobody can lock a real person
// out by guessing at their e-mail (OWASP ASVS 5.0 §6.1.1, §6.3.1). The account key is the typed
// e-mail whether or not the account exists, so the limiter reveals nothing about it.
//
// - Per account: after `maxPerAccount` failures each further attempt waits a delay that starts
//   at `baseDelayS` and doubles with every failure, at most `windowS`; a correct password after
//   the wait signs in, and the failures are forgotten once `windowS` passes with no failure and no wait.
// - Per address: a much looser abuse guard. Past `maxPerAddress` failed or refused attempts in a
//   window the address is slowed (the caller pauses its attempts and answers a wrong password
//   with the address's retry-after), but a correct password for an account that is not itself
//   slowed always signs in: behind a shared proxy one attacker must not lock out a building.
export interface SignInLimiterOptions {
  windowS: number;
  maxPerAccount: number;
  maxPerAddress: number;
  /** The first delay once an account is slowed; default 30 s. */
  baseDelayS?: number;
  now?: () => number;
}

export interface SignInCheck {
  /** Seconds until this account may try again; 0 when it may now. */
  accountRetryAfterS: number;
  /** Seconds until the address is no longer slowed; 0 when it is not. */
  addressRetryAfterS: number;
}

export interface FailureOutcome {
  /** This failure started the account's slow-down (once per episode: the moment to tell its owner). */
  throttleStarted: boolean;
  /** Seconds the account now waits; 0 while it has failures to spare. */
  retryAfterS: number;
}

export interface SignInLimiter {
  check(account: string, address: string): SignInCheck;
  /** Seconds until the caller may try again, or 0 when an attempt is allowed now. */
  retryAfterS(account: string, address: string): number;
  recordFailure(account: string, address: string): FailureOutcome;
  /** An attempt refused before its password was checked still counts against its address. */
  recordRefusal(address: string): void;
  recordSuccess(account: string): void;
}

interface AccountState {
  failures: number;
  lastFailureMs: number;
  waitUntilMs: number;
}

interface AddressState {
  startMs: number;
  attempts: number;
}

/** Entries kept before the oldest are dropped, so a flood of made-up e-mails cannot grow memory without end. */
const MAX_KEYS = 100_000;

export function createSignInLimiter(opts: SignInLimiterOptions): SignInLimiter {
  const now = opts.now ?? Date.now;
  const windowMs = opts.windowS * 1000;
  const baseDelayMs = (opts.baseDelayS ?? 30) * 1000;
  const accounts = new Map<string, AccountState>();
  const addresses = new Map<string, AddressState>();

  const seconds = (ms: number) => (ms > 0 ? Math.ceil(ms / 1000) : 0);
  const remember = <T>(map: Map<string, T>, key: string, value: T) => {
    map.delete(key);
    if (map.size >= MAX_KEYS) map.delete(map.keys().next().value!);
    map.set(key, value);
  };

  function account(key: string, t: number): AccountState | undefined {
    const s = accounts.get(key);
    // Waiting out the longest delay does not wipe the slate: that takes a quiet window after it.
    if (s && t - Math.max(s.lastFailureMs, s.waitUntilMs) >= windowMs) {
      accounts.delete(key);
      return undefined;
    }
    return s;
  }

  function address(key: string, t: number): AddressState | undefined {
    const s = addresses.get(key);
    if (s && t - s.startMs >= windowMs) {
      addresses.delete(key);
      return undefined;
    }
    return s;
  }

  function countAddress(key: string, t: number) {
    const s = address(key, t);
    if (s) s.attempts++;
    else remember(addresses, key, { startMs: t, attempts: 1 });
  }

  function check(accountKey: string, addressKey: string): SignInCheck {
    const t = now();
    const a = account(accountKey, t);
    const d = address(addressKey, t);
    return {
      accountRetryAfterS: a ? seconds(a.waitUntilMs - t) : 0,
      addressRetryAfterS: d && d.attempts >= opts.maxPerAddress ? seconds(d.startMs + windowMs - t) : 0,
    };
  }

  return {
    check,
    retryAfterS(accountKey, addressKey) {
      const c = check(accountKey, addressKey);
      return Math.max(c.accountRetryAfterS, c.addressRetryAfterS);
    },
    recordFailure(accountKey, addressKey) {
      const t = now();
      countAddress(addressKey, t);
      const s = account(accountKey, t) ?? { failures: 0, lastFailureMs: t, waitUntilMs: 0 };
      s.failures++;
      s.lastFailureMs = t;
      const over = s.failures - opts.maxPerAccount;
      if (over >= 0) s.waitUntilMs = t + Math.min(baseDelayMs * 2 ** Math.min(over, 30), windowMs);
      remember(accounts, accountKey, s);
      return { throttleStarted: over === 0, retryAfterS: seconds(s.waitUntilMs - t) };
    },
    recordRefusal(addressKey) {
      countAddress(addressKey, now());
    },
    recordSuccess(accountKey) {
      accounts.delete(accountKey);
    },
  };
}
