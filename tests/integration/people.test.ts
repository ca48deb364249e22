import Database from "better-sqlite3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signIn, startServer, type TestServer } from "../helpers/server";

// People against the real server: invitations and password resets through the e-mailed links read
// back from the local SMTP sink, the password policy (OWASP ASVS 5.0 §6.2), no account enumeration
// on reset (OWASP Forgot Password Cheat Sheet), roles, disabling, the last-admin guard, token scopes
// and the audit trail.
let server: TestServer;
const cookies: Record<string, string> = {};
const bodies: string[] = [];
const RESET_TTL_S = 10;

const ADMIN = "admin@tallgrass.example";
const TECH = "luis@tallgrass.example";
const CUSTOMER = "facilities@harborview.example";
const HARBORVIEW_ORG = "org-harborview";
const HARBORVIEW_SITE = "harborview-mob";
// A passphrase of four ordinary words: long, not in the common list, no composition rules (ASVS 5.0 6.2.5).
const GOOD_PASSWORD = "chiller tower pump basin";

type Who = "admin" | "technician" | "customer" | "anonymous" | { cookie: string } | { bearer: string };

async function call(who: Who, path: string, init: RequestInit & { json?: unknown } = {}) {
  const headers = new Headers(init.headers);
  if (typeof who === "object" && "bearer" in who) headers.set("authorization", `Bearer ${who.bearer}`);
  else if (who !== "anonymous") {
    headers.set("cookie", typeof who === "object" ? who.cookie : cookies[who]);
    headers.set("origin", server.url);
  }
  let body = init.body;
  if (init.json !== undefined) {
    headers.set("content-type", "application/json");
    body = JSON.stringify(init.json);
  }
  const res = await fetch(server.url + path, { ...init, body, headers, redirect: "manual" });
  const text = await res.text();
  bodies.push(text);
  const json = (res.headers.get("content-type") ?? "").includes("json");
  return { status: res.status, body: json && text ? JSON.parse(text) : null, text };
}

/** The newest message to `to` in the sink's outbox, waiting for it to arrive. */
async function mailTo(to: string, after = 0): Promise<{ id: number; subject: string; text: string }> {
  for (let i = 0; i < 100; i++) {
    const { body } = await call("admin", "/api/outbox");
    const mail = body.messages.find((m: { to: string; id: number }) => m.to === to && m.id > after);
    if (mail) return mail;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`no mail to ${to}`);
}

const linkToken = (text: string, path: "invite" | "reset-password") =>
  new RegExp(`/${path}/([A-Za-z0-9_-]{43})`).exec(text)![1];

async function invite(email: string, role: string, organizationId?: string) {
  return call("admin", "/api/people", {
    method: "POST",
    json: { email, name: `Person ${email}`, role, organizationId },
  });
}

async function acceptInvitation(email: string, password = GOOD_PASSWORD): Promise<string> {
  const mail = await mailTo(email);
  const token = linkToken(mail.text, "invite");
  const set = await call("anonymous", `/api/account-links/${token}`, { method: "POST", json: { password } });
  expect(set.status, set.text).toBe(200);
  return token;
}

beforeAll(async () => {
  server = await startServer({ env: { RESET_LINK_TTL_S: String(RESET_TTL_S) } });
  for (const [who, email] of [
    ["admin", ADMIN],
    ["technician", TECH],
    ["customer", CUSTOMER],
  ] as const) {
    const res = await signIn(server.url, email);
    expect(res.cookie, who).toBeTruthy();
    cookies[who] = res.cookie!;
  }
  // In development mode each route compiles on its first request: do it here, under the hook's longer timeout.
  const warm = ["/api/people", "/api/people/x", "/api/people/x/invitation", "/api/outbox", "/api/account"];
  warm.push("/api/account/password", "/api/password-reset", "/api/audit", `/api/account-links/${"C".repeat(43)}`);
  warm.push("/api/tokens", "/api/sites", "/api/alarms/x/ack");
  for (const path of warm) await call("admin", path);
}, 180_000);

afterAll(async () => {
  await server?.stop();
  if (!server) return;
  // No response and no audit entry ever held a password hash or a link/token hash.
  const db = new Database(server.databasePath, { readonly: true });
  const secrets = [
    ...(db.prepare("select password_hash as h from users").all() as { h: string }[]).map((r) => r.h),
    ...(db.prepare("select token_hash as h from api_tokens").all() as { h: string }[]).map((r) => r.h),
    ...(db.prepare("select token_hash as h from account_links").all() as { h: string }[]).map((r) => r.h),
  ];
  const audit = (db.prepare("select before, after, summary from audit_log").all() as Record<string, string>[]).map(
    (r) => `${r.before} ${r.after} ${r.summary}`,
  );
  db.close();
  expect(secrets.length).toBeGreaterThan(8);
  for (const text of [...bodies, ...audit]) {
    for (const secret of secrets) expect(text.includes(secret)).toBe(false);
    expect(text).not.toMatch(/\$2[aby]\$\d\d\$/);
  }
});

describe("invitations", () => {
  it("invite → e-mailed link → set a password → sign in; the link works once", async () => {
    const email = "new.tech@tallgrass.example";
    const invited = await invite(email, "technician");
    expect(invited.status, invited.text).toBe(201);
    expect(invited.body.person).toMatchObject({ email, role: "technician", organizationId: "org-tallgrass" });
    expect(invited.body.person.status).toBe("invited");

    // Invited but no password yet: sign-in is refused like a wrong password, not with a reason of its own.
    const early = await signIn(server.url, email, "anything at all here");
    const wrong = await signIn(server.url, TECH, "not luis's password at all");
    expect(early.cookie).toBeNull();
    expect(early.error).toBe(wrong.error);

    const mail = await mailTo(email);
    expect(mail.subject).toMatch(/invited/i);
    const token = linkToken(mail.text, "invite");
    const peek = await call("anonymous", `/api/account-links/${token}`);
    expect(peek.body).toMatchObject({ valid: true, purpose: "invite", email });

    // The policy's refusals say why (OWASP ASVS 5.0 §6.2.1 length, §6.2.4 common passwords).
    const short = await call("anonymous", `/api/account-links/${token}`, {
      method: "POST",
      json: { password: "short" },
    });
    expect(short.status).toBe(400);
    expect(short.body.error.message).toMatch(/at least 12 characters/);
    const common = await call("anonymous", `/api/account-links/${token}`, {
      method: "POST",
      json: { password: "qwertyuiop12" },
    });
    expect(common.status).toBe(400);
    expect(common.body.error.details.map((d: { code: string }) => d.code)).toContain("common");

    const set = await call("anonymous", `/api/account-links/${token}`, {
      method: "POST",
      json: { password: GOOD_PASSWORD },
    });
    expect(set.status).toBe(200);
    expect(set.body).toMatchObject({ purpose: "invite", email, next: "/sign-in" });
    const again = await call("anonymous", `/api/account-links/${token}`, {
      method: "POST",
      json: { password: "another fine passphrase" },
    });
    expect(again.status).toBe(409);
    expect((await call("anonymous", `/api/account-links/${token}`)).body).toEqual({ valid: false, reason: "used" });

    const signedIn = await signIn(server.url, email, GOOD_PASSWORD);
    expect(signedIn.cookie).toBeTruthy();
    const account = await call({ cookie: signedIn.cookie! }, "/api/account");
    expect(account.body.account).toMatchObject({ email, role: "technician" });
    const person = await call("admin", `/api/people/${invited.body.person.id}`);
    expect(person.body.person.status).toBe("active");
  }, 90_000); // eight bcrypt hashes on a shared 2-core machine

  it("re-sending an invitation kills the earlier link", async () => {
    const email = "second.look@tallgrass.example";
    const { body } = await invite(email, "technician");
    const first = await mailTo(email);
    const resent = await call("admin", `/api/people/${body.person.id}/invitation`, { method: "POST" });
    expect(resent.status).toBe(200);
    const second = await mailTo(email, first.id);
    const oldToken = linkToken(first.text, "invite");
    const newToken = linkToken(second.text, "invite");
    expect(newToken).not.toBe(oldToken);
    expect((await call("anonymous", `/api/account-links/${oldToken}`)).body).toEqual({ valid: false, reason: "used" });
    expect((await call("anonymous", `/api/account-links/${newToken}`)).body.valid).toBe(true);
    const refused = await call("anonymous", `/api/account-links/${oldToken}`, {
      method: "POST",
      json: { password: GOOD_PASSWORD },
    });
    expect(refused.status).toBe(409);
  });

  it("a customer user belongs to exactly one customer organization and sees only its sites", async () => {
    expect((await invite("nobody.org@harborview.example", "customer")).status).toBe(400);
    expect((await invite("wrong.org@harborview.example", "customer", "org-tallgrass")).status).toBe(400);
    expect((await invite("staff.in.customer@tallgrass.example", "technician", HARBORVIEW_ORG)).status).toBe(400);
    const email = "engineer@harborview.example";
    const invited = await invite(email, "customer", HARBORVIEW_ORG);
    expect(invited.status).toBe(201);
    await acceptInvitation(email);
    const { cookie } = await signIn(server.url, email, GOOD_PASSWORD);
    const sites = await call({ cookie: cookie! }, "/api/sites");
    expect(sites.body.sites.map((s: { id: string }) => s.id)).toEqual([HARBORVIEW_SITE]);
    expect((await call({ cookie: cookie! }, "/api/sites/quarry-ridge-dh2")).status).toBe(404);
  });

  it("an address already in use is a conflict", async () => {
    expect((await invite(TECH, "technician")).status).toBe(409);
  });
});

describe("password reset", () => {
  it("answers an unknown address exactly as a known one", async () => {
    const known = await call("anonymous", "/api/password-reset", { method: "POST", json: { email: TECH } });
    const unknown = await call("anonymous", "/api/password-reset", {
      method: "POST",
      json: { email: "nobody-here@tallgrass.example" },
    });
    expect(known.status).toBe(202);
    expect(unknown.status).toBe(known.status);
    expect(unknown.text).toBe(known.text);
  });

  it("a reset link sets a new password once, signs the person out elsewhere, and expires", async () => {
    const email = "priya@tallgrass.example";
    const before = await signIn(server.url, email);
    expect(before.cookie).toBeTruthy();
    expect((await call({ cookie: before.cookie! }, "/api/account")).status).toBe(200);

    await call("anonymous", "/api/password-reset", { method: "POST", json: { email } });
    const mail = await mailTo(email);
    expect(mail.subject).toMatch(/reset/i);
    const token = linkToken(mail.text, "reset-password");
    const set = await call("anonymous", `/api/account-links/${token}`, {
      method: "POST",
      json: { password: "condenser relief valve" },
    });
    expect(set.status, set.text).toBe(200);
    expect((await call({ cookie: before.cookie! }, "/api/account")).status).toBe(401);
    expect((await signIn(server.url, email, "condenser relief valve")).cookie).toBeTruthy();
    expect(
      (await call("anonymous", `/api/account-links/${token}`, { method: "POST", json: { password: GOOD_PASSWORD } }))
        .status,
    ).toBe(409);

    // RESET_LINK_TTL_S is set short for this server (10 s, long enough for a development-mode compile): wait it out.
    await call("anonymous", "/api/password-reset", { method: "POST", json: { email } });
    const late = await mailTo(email, mail.id);
    const lateToken = linkToken(late.text, "reset-password");
    await new Promise((r) => setTimeout(r, RESET_TTL_S * 1000 + 300));
    expect((await call("anonymous", `/api/account-links/${lateToken}`)).body).toEqual({
      valid: false,
      reason: "expired",
    });
    const expired = await call("anonymous", `/api/account-links/${lateToken}`, {
      method: "POST",
      json: { password: GOOD_PASSWORD },
    });
    expect(expired.status).toBe(409);
  });

  it("an unknown or malformed link is 404", async () => {
    const made = "A".repeat(43);
    expect((await call("anonymous", `/api/account-links/${made}`)).body).toEqual({ valid: false, reason: "unknown" });
    expect(
      (await call("anonymous", `/api/account-links/${made}`, { method: "POST", json: { password: GOOD_PASSWORD } }))
        .status,
    ).toBe(404);
    expect(
      (await call("anonymous", "/api/account-links/short", { method: "POST", json: { password: "x" } })).status,
    ).toBe(404);
  });
});

describe("people administration", () => {
  const matrix: Array<{ method: string; path: string; json?: unknown; expect: Record<string, number> }> = [
    { method: "GET", path: "/api/people", expect: { anonymous: 401, technician: 403, customer: 403, admin: 200 } },
    {
      method: "GET",
      path: "/api/people/user-tech-1",
      expect: { anonymous: 401, technician: 403, customer: 403, admin: 200 },
    },
    {
      method: "GET",
      path: "/api/people/no-such",
      expect: { anonymous: 401, technician: 403, customer: 403, admin: 404 },
    },
    {
      method: "PATCH",
      path: "/api/people/no-such",
      json: { disabled: true },
      expect: { anonymous: 401, technician: 403, customer: 403, admin: 404 },
    },
    {
      method: "POST",
      path: "/api/people",
      json: { email: "x@y.example", name: "X", role: "technician" },
      expect: { anonymous: 401, technician: 403, customer: 403 },
    },
    { method: "GET", path: "/api/audit", expect: { anonymous: 401, technician: 403, customer: 403, admin: 200 } },
    { method: "GET", path: "/api/account", expect: { anonymous: 401, technician: 200, customer: 200, admin: 200 } },
  ];
  for (const row of matrix)
    for (const [who, status] of Object.entries(row.expect))
      it(`${who} ${row.method} ${row.path} → ${status}`, async () => {
        const res = await call(who as Who, row.path, { method: row.method, json: row.json });
        expect(res.status).toBe(status);
      });

  it("validation errors name the field", async () => {
    const res = await call("admin", "/api/people", { method: "POST", json: { email: "not-an-address", role: "boss" } });
    expect(res.status).toBe(400);
    const paths = res.body.error.details.map((d: { path: string }) => d.path);
    expect(paths).toEqual(expect.arrayContaining(["email", "name", "role"]));
  });

  it("the last enabled admin can be neither demoted nor disabled; with a second admin, the change goes through", async () => {
    const people = (await call("admin", "/api/people")).body.people as { id: string; email: string }[];
    const me = people.find((p) => p.email === ADMIN)!;
    const demote = await call("admin", `/api/people/${me.id}`, { method: "PATCH", json: { role: "technician" } });
    expect(demote.status).toBe(409);
    expect(demote.body.error.message).toMatch(/last enabled administrator/);
    expect((await call("admin", `/api/people/${me.id}`, { method: "PATCH", json: { disabled: true } })).status).toBe(
      409,
    );

    // An invited admin who has not set a password cannot sign in, so does not count.
    const second = await invite("second.admin@tallgrass.example", "admin");
    expect((await call("admin", `/api/people/${me.id}`, { method: "PATCH", json: { disabled: true } })).status).toBe(
      409,
    );
    await acceptInvitation("second.admin@tallgrass.example");
    const off = await call("admin", `/api/people/${second.body.person.id}`, {
      method: "PATCH",
      json: { disabled: true },
    });
    expect(off.status).toBe(200);
    expect(off.body.person.status).toBe("disabled");
    const on = await call("admin", `/api/people/${second.body.person.id}`, {
      method: "PATCH",
      json: { disabled: false },
    });
    expect(on.body.person.status).toBe("active");
  });

  it("disabling takes effect at once and is audited before → after; re-enabling restores sign-in", async () => {
    const email = "short.stay@tallgrass.example";
    const { body } = await invite(email, "technician");
    await acceptInvitation(email);
    const { cookie } = await signIn(server.url, email, GOOD_PASSWORD);
    expect((await call({ cookie: cookie! }, "/api/account")).status).toBe(200);

    expect(
      (await call("admin", `/api/people/${body.person.id}`, { method: "PATCH", json: { disabled: true } })).status,
    ).toBe(200);
    expect((await call({ cookie: cookie! }, "/api/account")).status).toBe(401);
    expect((await signIn(server.url, email, GOOD_PASSWORD)).cookie).toBeNull();
    await call("admin", `/api/people/${body.person.id}`, { method: "PATCH", json: { disabled: false } });
    expect((await signIn(server.url, email, GOOD_PASSWORD)).cookie).toBeTruthy();

    const moved = await call("admin", `/api/people/${body.person.id}`, {
      method: "PATCH",
      json: { role: "customer", organizationId: HARBORVIEW_ORG },
    });
    expect(moved.body.person).toMatchObject({ role: "customer", organizationId: HARBORVIEW_ORG });

    const audit = await call("admin", `/api/audit?entityType=person&entityId=${body.person.id}`);
    const actions = audit.body.entries.map((e: { action: string }) => e.action);
    expect(actions).toEqual(["change_access", "enable", "disable", "accept_invitation", "invite"]);
    const disable = audit.body.entries.find((e: { action: string }) => e.action === "disable");
    expect(disable.before.status).toBe("active");
    expect(disable.after.status).toBe("disabled");
    const change = audit.body.entries[0];
    expect(change.before).toMatchObject({ role: "technician", organizationId: "org-tallgrass" });
    expect(change.after).toMatchObject({ role: "customer", organizationId: HARBORVIEW_ORG });
  });
});

describe("own account", () => {
  it("edits name, phone and units; validation names the field", async () => {
    const saved = await call("technician", "/api/account", {
      method: "PATCH",
      json: { name: "Luis F.", phone: "+1 555 010 0199", unitSystem: "si" },
    });
    expect(saved.status).toBe(200);
    expect(saved.body.account).toMatchObject({ name: "Luis F.", phone: "+1 555 010 0199", unitSystem: "si" });
    const bad = await call("technician", "/api/account", { method: "PATCH", json: { phone: "call me maybe" } });
    expect(bad.status).toBe(400);
    expect(bad.body.error.details[0].path).toBe("phone");
  });

  it("changes the password only with the current one and refuses a common one", async () => {
    const email = "own.password@tallgrass.example";
    await invite(email, "technician");
    await acceptInvitation(email);
    const { cookie } = await signIn(server.url, email, GOOD_PASSWORD);
    const who = { cookie: cookie! };
    const wrong = await call(who, "/api/account/password", {
      method: "POST",
      json: { currentPassword: "not my password", newPassword: "evaporator approach temp" },
    });
    expect(wrong.status).toBe(400);
    const common = await call(who, "/api/account/password", {
      method: "POST",
      json: { currentPassword: GOOD_PASSWORD, newPassword: "qwertyuiop12" },
    });
    expect(common.status).toBe(400);
    const ok = await call(who, "/api/account/password", {
      method: "POST",
      json: { currentPassword: GOOD_PASSWORD, newPassword: "evaporator approach temp" },
    });
    expect(ok.status).toBe(204);
    expect((await call(who, "/api/account")).status).toBe(200);
    expect((await signIn(server.url, email, "evaporator approach temp")).cookie).toBeTruthy();
    expect((await signIn(server.url, email, GOOD_PASSWORD)).cookie).toBeNull();
  });
});

describe("API token scopes", () => {
  async function token(who: Who, scope?: string) {
    const res = await call(who, "/api/tokens", { method: "POST", json: { name: `scope ${scope}`, scope } });
    return { status: res.status, token: res.body?.token as string, apiToken: res.body?.apiToken };
  }

  it("a read token only reads", async () => {
    const { token: read, apiToken } = await token("admin", "read");
    expect(apiToken.scope).toBe("read");
    expect((await call({ bearer: read }, "/api/sites")).status).toBe(200);
    const ack = await call({ bearer: read }, "/api/alarms/any-alarm/ack", { method: "POST", json: {} });
    expect(ack.status).toBe(403);
    // An admin's read token is no admin either.
    expect((await call({ bearer: read }, "/api/people")).status).toBe(403);
  });

  it("an act token cannot administer; an admin token can", async () => {
    const { token: act } = await token("admin", "act");
    const invited = await call({ bearer: act }, "/api/people", {
      method: "POST",
      json: { email: "by.token@tallgrass.example", name: "By Token", role: "technician" },
    });
    expect(invited.status).toBe(403);
    expect((await call({ bearer: act }, "/api/audit")).status).toBe(403);
    // ... nor give a wider scope than its own to a token it makes.
    expect((await token({ bearer: act }, "admin")).status).toBe(403);
    const { token: admin } = await token("admin", "admin");
    expect((await call({ bearer: admin }, "/api/audit")).status).toBe(200);
  });

  it("never above the owner's role", async () => {
    expect((await token("technician", "admin")).status).toBe(403);
    expect((await token("technician", "act")).status).toBe(201);
    expect((await token("customer", "act")).status).toBe(403);
    const plain = await token("customer");
    expect(plain.apiToken.scope).toBe("read");
  });

  it("token creation and revocation are audited without the secret", async () => {
    const { apiToken } = await token("technician", "read");
    expect((await call("technician", `/api/tokens/${apiToken.id}`, { method: "DELETE" })).status).toBe(204);
    const audit = await call("admin", `/api/audit?entityType=token&entityId=${apiToken.id}`);
    expect(audit.body.entries.map((e: { action: string }) => e.action)).toEqual(["revoke", "create"]);
    expect(audit.body.entries[1].after).toMatchObject({ scope: "read", prefix: apiToken.prefix });
  });
});

describe("audit API", () => {
  it("filters by actor and time and pages newest first", async () => {
    const all = await call("admin", "/api/audit?limit=200");
    expect(all.body.entries.length).toBeGreaterThan(5);
    const ids = all.body.entries.map((e: { id: number }) => e.id);
    expect([...ids].sort((a, b) => b - a)).toEqual(ids);
    const page = await call("admin", "/api/audit?limit=2");
    expect(page.body.entries).toHaveLength(2);
    const next = await call("admin", `/api/audit?limit=2&before=${page.body.nextBefore}`);
    expect(next.body.entries[0].id).toBeLessThan(page.body.entries[1].id + 1);
    expect(next.body.entries[0].id).toBe(ids[2]);
    const byTech = await call("admin", "/api/audit?actorId=user-tech-1");
    for (const e of byTech.body.entries) expect(e.actorId).toBe("user-tech-1");
    const future = await call("admin", `/api/audit?from=${Date.now() + 3_600_000}`);
    expect(future.body.entries).toEqual([]);
    expect((await call("admin", "/api/audit?entityType=nonsense")).status).toBe(400);
  });
});

describe("pages", () => {
  it("admin pages are the admin's; the e-mailed links' pages and forgot-password are public", async () => {
    for (const path of ["/admin/people", "/admin/audit"]) {
      expect((await call("admin", path)).status, path).toBe(200);
      expect((await call("technician", path)).status, path).toBe(404);
    }
    const email = "page.check@tallgrass.example";
    await invite(email, "technician");
    const token = linkToken((await mailTo(email)).text, "invite");
    const page = await call("anonymous", `/invite/${token}`);
    expect(page.status).toBe(200);
    expect(page.text).toContain(email);
    // Showing the page does not use the link (mail scanners fetch links).
    expect((await call("anonymous", `/api/account-links/${token}`)).body.valid).toBe(true);
    const used = await call("anonymous", `/reset-password/${"B".repeat(43)}`);
    expect(used.status).toBe(200);
    expect(used.text).toContain("This link is not valid.");
    const forgot = await call("anonymous", "/forgot-password");
    expect(forgot.status).toBe(200);
    expect((await call("anonymous", "/sign-in")).text).toContain("Forgot password?");
  }, 180_000); // each page compiles on first request in development mode
});
