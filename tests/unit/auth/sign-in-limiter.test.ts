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
