import Database from "better-sqlite3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signIn, startServer, type TestServer } from "../helpers/server";

// The sign-in policy against the real server (OWASP ASVS 5.0 §6.1.1, §6.3.1, §6.3.5): accounts are
// slowed and their owners told, an address is only a loose abuse guard that never blocks another
// account's correct password, and X-Forwarded-For counts only from a trusted proxy. The test plays
// that proxy from 127.0.0.2 (all of 127.0.0.0/8 is loopback); plain requests come from 127.0.0.1.
let server: TestServer;
const PROXY = "127.0.0.2";
const MAX_PER_ADDRESS = 20;
const MAX_PER_ACCOUNT = 25;

beforeAll(async () => {
  server = await startServer({
    env: {
      TRUSTED_PROXY: PROXY,
      SIGNIN_MAX_PER_ADDRESS: String(MAX_PER_ADDRESS),
      SIGNIN_MAX_PER_ACCOUNT: String(MAX_PER_ACCOUNT),
      SIGNIN_ADDRESS_DELAY_MS: "100",
    },
  });
  // In development mode the first request compiles the route; not part of what is timed below.
  await signIn(server.url, "warm-up@tallgrass.example", "whatever-1", viaProxy("192.0.2.250"));
});
afterAll(() => server?.stop());

/** A request relayed by the trusted proxy for `client`. */
const viaProxy = (client: string) => ({ localAddress: PROXY, headers: { "x-forwarded-for": client } });

// Every attempt checks a bcrypt hash at cost 12 (db/password.ts): about a second each on a busy machine.
const LONG = { timeout: 120_000 };

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

describe("sign-in policy", () => {
  it(
    "takes about as long for an unknown e-mail as for a known account's wrong password (no enumeration by timing)",
    LONG,
    async () => {
      // OWASP Authentication Cheat Sheet, "Authentication Responses": no difference in response time.
      // Each attempt comes through the proxy from an address of its own, so no address limit interferes.
      const unknown: number[] = [];
      const known: number[] = [];
      const accounts = ["facilities@harborview.example", "ops@quarryridge.example"];
      for (let i = 0; i < 10; i++) {
        let t = performance.now();
        const u = await signIn(server.url, `nobody-${i}@tallgrass.example`, "wrong-password", viaProxy(`192.0.2.${i}`));
        unknown.push(performance.now() - t);
        t = performance.now();
        const k = await signIn(server.url, accounts[i % 2], "wrong-password", viaProxy(`192.0.2.${100 + i}`));
        known.push(performance.now() - t);
        expect([u.error, k.error]).toEqual(["CredentialsSignin", "CredentialsSignin"]);
      }
      const [a, b] = [median(unknown), median(known)];
      expect(Math.max(a, b) / Math.min(a, b), `medians ${a.toFixed(0)} ms and ${b.toFixed(0)} ms`).toBeLessThan(1.4);
    },
  );

  it(
    "20 failures from one address against account A do not stop account B's correct sign-in from it",
    LONG,
    async () => {
      for (let i = 0; i < MAX_PER_ADDRESS; i++) {
        const res = await signIn(server.url, "luis@tallgrass.example", "wrong-password");
        expect(res.cookie).toBeNull();
      }
      const b = await signIn(server.url, "priya@tallgrass.example");
      expect(b.error).toBeNull();
      expect(b.cookie).toBeTruthy();
      // The address is slowed all the same: a wrong password from it is told to wait.
      const wrong = await signIn(server.url, "dana@elsewhere.example", "wrong-password");
      expect(wrong.error).toMatch(/^AddressLimited:\d+$/);
    },
  );

  it(
    "slows account A once it has used its failures: a retry-after, even for the right password, and an e-mail to its owner",
    LONG,
    async () => {
      // A has MAX_PER_ADDRESS failures from the test above; these use the rest, through the proxy.
      for (let i = MAX_PER_ADDRESS; i < MAX_PER_ACCOUNT; i++)
        await signIn(server.url, "luis@tallgrass.example", "wrong-password", viaProxy(`198.51.100.${i}`));
      const slowed = await signIn(server.url, "luis@tallgrass.example", undefined, viaProxy("198.51.100.99"));
      expect(slowed.cookie).toBeNull();
      expect(slowed.error).toMatch(/^RateLimited:\d+$/);
      expect(Number(slowed.error!.split(":")[1])).toBeGreaterThanOrEqual(29); // SIGNIN_BASE_DELAY_S, 30 by default

      let mail: { subject: string; text: string } | undefined;
      for (let i = 0; i < 50 && !mail; i++) {
        const db = new Database(server.databasePath, { readonly: true });
        mail = db
          .prepare("select subject, text from mail_messages where to_address = ?")
          .get("luis@tallgrass.example") as typeof mail;
        db.close();
        if (!mail) await new Promise((r) => setTimeout(r, 100));
      }
      expect(mail?.subject).toMatch(/failed sign-ins/);
      expect(mail?.text).toContain("198.51.100.24");
    },
  );

  it(
    "reads the client address from X-Forwarded-For only when the request came through the trusted proxy",
    LONG,
    async () => {
      // 127.0.0.1 is slowed (the failures above). Relayed by the proxy, X-Forwarded-For decides.
      const relayedSlowed = await signIn(server.url, "probe-1@tallgrass.example", "x-1", viaProxy("127.0.0.1"));
      expect(relayedSlowed.error).toMatch(/^AddressLimited:/);
      const relayedFresh = await signIn(server.url, "probe-2@tallgrass.example", "x-1", viaProxy("203.0.113.7"));
      expect(relayedFresh.error).toBe("CredentialsSignin");
      // Sent straight from 127.0.0.1, which is no trusted proxy: the header is ignored.
      const spoofed = await signIn(server.url, "probe-3@tallgrass.example", "x-1", {
        headers: { "x-forwarded-for": "203.0.113.8" },
      });
      expect(spoofed.error).toMatch(/^AddressLimited:/);
    },
  );
});
