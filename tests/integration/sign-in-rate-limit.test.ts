import Database from "better-sqlite3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signIn, startServer, type TestServer } from "../helpers/server";

let server: TestServer;
const WINDOW_S = 3;

beforeAll(async () => {
  server = await startServer({
    env: { SIGNIN_WINDOW_S: String(WINDOW_S), SIGNIN_MAX_PER_ACCOUNT: "3", SIGNIN_MAX_PER_ADDRESS: "50" },
  });
});
afterAll(() => server?.stop());

describe("sign-in rate limit", () => {
  it("refuses a correct password after repeated failures, then recovers after the window", async () => {
    const email = "priya@tallgrass.example";
    for (let i = 0; i < 3; i++) {
      const res = await signIn(server.url, email, "wrong-password");
      expect(res.cookie).toBeNull();
      expect(res.error).toBe("CredentialsSignin");
    }
    const blocked = await signIn(server.url, email);
    expect(blocked.cookie).toBeNull();
    // The code now carries the seconds to wait: `RateLimited:<s>`, never more than the window.
    expect(blocked.error).toMatch(/^RateLimited:\d+$/);
    expect(Number(blocked.error!.split(":")[1])).toBeLessThanOrEqual(WINDOW_S);

    await new Promise((r) => setTimeout(r, WINDOW_S * 1000 + 300));
    const ok = await signIn(server.url, email);
    expect(ok.cookie).toBeTruthy();
  });

  it("tells the slowed account's owner by e-mail through the mail path (OWASP ASVS 5.0 §6.3.5)", async () => {
    // The first test slowed priya's account; the local SMTP sink keeps the notice for the outbox.
    let mail: { to_address: string; subject: string; text: string } | undefined;
    for (let i = 0; i < 50 && !mail; i++) {
      const db = new Database(server.databasePath, { readonly: true });
      mail = db
        .prepare("select to_address, subject, text from mail_messages where to_address = ?")
        .get("priya@tallgrass.example") as typeof mail;
      db.close();
      if (!mail) await new Promise((r) => setTimeout(r, 100));
    }
    expect(mail?.subject).toMatch(/failed sign-ins/);
    expect(mail?.text).toMatch(/not locked/);
  });

  it("answers an unknown account exactly like a wrong password (no enumeration)", async () => {
    const unknown = await signIn(server.url, "nobody@tallgrass.example", "whatever-1");
    const wrong = await signIn(server.url, "luis@tallgrass.example", "whatever-1");
    expect(unknown.error).toBe("CredentialsSignin");
    expect(wrong.error).toBe(unknown.error);
    expect(wrong.status).toBe(unknown.status);
  });
});
