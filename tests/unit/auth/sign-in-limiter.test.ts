import { describe, expect, it } from "vitest";
import { createSignInLimiter } from "@/lib/auth/sign-in-limiter";

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe("sign-in limiter", () => {
  it("blocks an account after the allowed failures and lets it in again after the window", async () => {
    const limiter = createSignInLimiter({ windowS: 1, maxPerAccount: 3, maxPerAddress: 100 });
    for (let i = 0; i < 3; i++) {
      expect(await limiter.retryAfterS("a@x.example", "10.0.0.1")).toBe(0);
      await limiter.recordFailure("a@x.example", "10.0.0.1");
    }
    expect(await limiter.retryAfterS("a@x.example", "10.0.0.1")).toBeGreaterThan(0);
    // another account from the same address is not affected by the account limit
    expect(await limiter.retryAfterS("b@x.example", "10.0.0.1")).toBe(0);
    await sleep(1100);
    expect(await limiter.retryAfterS("a@x.example", "10.0.0.1")).toBe(0);
  });

  it("blocks an address that tries many accounts, whether or not they exist", async () => {
    const limiter = createSignInLimiter({ windowS: 60, maxPerAccount: 100, maxPerAddress: 4 });
    for (let i = 0; i < 4; i++) await limiter.recordFailure(`user${i}@x.example`, "10.0.0.2");
    expect(await limiter.retryAfterS("fresh@x.example", "10.0.0.2")).toBeGreaterThan(0);
    expect(await limiter.retryAfterS("fresh@x.example", "10.0.0.3")).toBe(0);
  });

  it("clears an account's failures on a successful sign-in", async () => {
    const limiter = createSignInLimiter({ windowS: 60, maxPerAccount: 2, maxPerAddress: 100 });
    await limiter.recordFailure("c@x.example", "10.0.0.4");
    await limiter.recordSuccess("c@x.example");
    await limiter.recordFailure("c@x.example", "10.0.0.4");
    expect(await limiter.retryAfterS("c@x.example", "10.0.0.4")).toBe(0);
  });
});

// The policy of OWASP ASVS 5.0 §6.1.1 and §6.3.1: slow an account down, never lock it; the address
// is a loose guard only. A fake clock stands in for the minutes that pass.
describe("sign-in slow-down", () => {
  function clocked(opts: { maxPerAccount?: number; maxPerAddress?: number; baseDelayS?: number; windowS?: number }) {
    let t = 1_000_000;
    const limiter = createSignInLimiter({
      windowS: opts.windowS ?? 900,
      maxPerAccount: opts.maxPerAccount ?? 5,
      maxPerAddress: opts.maxPerAddress ?? 100,
      baseDelayS: opts.baseDelayS ?? 30,
      now: () => t,
    });
    return { limiter, advanceS: (s: number) => (t += s * 1000) };
  }

  it("makes each attempt past the allowed failures wait longer: 30 s, 60 s, 120 s, … at most the window", () => {
    const { limiter, advanceS } = clocked({});
    for (let i = 0; i < 4; i++) expect(limiter.recordFailure("a@x.example", "10.0.0.1").retryAfterS).toBe(0);
    const waits: number[] = [];
    for (let i = 0; i < 7; i++) {
      const { retryAfterS } = limiter.recordFailure("a@x.example", "10.0.0.1");
      waits.push(retryAfterS);
      expect(limiter.check("a@x.example", "10.0.0.1").accountRetryAfterS).toBe(retryAfterS);
      advanceS(retryAfterS); // waits its turn, then fails again
      expect(limiter.check("a@x.example", "10.0.0.1").accountRetryAfterS).toBe(0);
    }
    expect(waits).toEqual([30, 60, 120, 240, 480, 900, 900]);
  });

  it("reports the start of a slow-down once per episode, the moment to tell the owner", () => {
    const { limiter, advanceS } = clocked({ maxPerAccount: 3, windowS: 60 });
    const started = () => limiter.recordFailure("b@x.example", "10.0.0.2").throttleStarted;
    expect([started(), started(), started(), started()]).toEqual([false, false, true, false]);
    advanceS(121); // a quiet window after the last wait (60 s): the failures are forgotten
    expect([started(), started(), started()]).toEqual([false, false, true]);
  });

  it("keeps an address's failures from slowing another account: the address is only reported as slowed", () => {
    const { limiter } = clocked({ maxPerAccount: 100, maxPerAddress: 20 });
    for (let i = 0; i < 20; i++) limiter.recordFailure("a@x.example", "10.0.0.3");
    const other = limiter.check("b@x.example", "10.0.0.3");
    expect(other.accountRetryAfterS).toBe(0);
    expect(other.addressRetryAfterS).toBeGreaterThan(0);
  });

  it("counts refused attempts against their address", () => {
    const { limiter } = clocked({ maxPerAddress: 3 });
    for (let i = 0; i < 3; i++) limiter.recordRefusal("10.0.0.4");
    expect(limiter.check("c@x.example", "10.0.0.4").addressRetryAfterS).toBeGreaterThan(0);
  });
});
