import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import bcrypt from "bcryptjs";
import Database from "better-sqlite3";
import { describe, expect, it } from "vitest";
import { ROOT } from "../helpers/server";

// `create-admin` as an operator runs it: the password from LIFTLINE_ADMIN_PASSWORD must pass the
// policy (OWASP ASVS 5.0 §6.2, lib/auth/password-policy.ts), and typed at a terminal it is never
// echoed (ASVS 5.0 6.2.6 asks that password fields mask the entry).

const ARGS = ["--import", "tsx", "--import", "./lib/server/server-only-hook.mjs", "db/create-admin.ts"];
const EMAIL = "jordan.reyes@tallgrass.example";
const who = ["--email", EMAIL, "--name", "Jordan Reyes", "--organization", "Tallgrass Mechanical Service"];

function tempDb() {
  return path.join(fs.mkdtempSync(path.join(os.tmpdir(), "liftline-admin-")), "liftline.db");
}

function run(password: string, databasePath: string, extraEnv: Record<string, string> = {}) {
  const env: NodeJS.ProcessEnv = { ...process.env };
  delete env.LIFTLINE_DEMO_PASSWORD;
  Object.assign(env, { DATABASE_PATH: databasePath, LIFTLINE_ADMIN_PASSWORD: password, ...extraEnv });
  const r = spawnSync(process.execPath, [...ARGS, ...who], { cwd: ROOT, env, encoding: "utf8", timeout: 60_000 });
  return { code: r.status, out: r.stdout + r.stderr };
}

function storedHash(databasePath: string): string | undefined {
  if (!fs.existsSync(databasePath)) return undefined;
  const db = new Database(databasePath, { readonly: true });
  try {
    return db.prepare("select password_hash from users where email = ?").pluck().get(EMAIL) as string | undefined;
  } finally {
    db.close();
  }
}

describe("create-admin", () => {
  it.each([
    ["aaaaaaaaaaaa", /repeats the same characters/],
    ["liftline-demo", /demo password/], // LIFTLINE_DEMO_PASSWORD's default
    ["1q2w3e4r5t6y", /most common passwords/],
    ["jordan.reyes-rooftop", /e-mail address/],
    ["eleven char", /at least 12 characters/],
  ])("refuses %j from LIFTLINE_ADMIN_PASSWORD and creates nobody", (password, why) => {
    const db = tempDb();
    const { code, out } = run(password, db);
    expect(code, out).toBe(2);
    expect(out).toMatch(why);
    expect(storedHash(db)).toBeUndefined();
  });

  it("refuses the configured demo password", () => {
    const db = tempDb();
    const { code, out } = run("a-demo-for-the-sales-team", db, { LIFTLINE_DEMO_PASSWORD: "a-demo-for-the-sales-team" });
    expect(code, out).toBe(2);
    expect(out).toMatch(/demo password/);
  });

  it("creates the admin with an acceptable password", async () => {
    const db = tempDb();
    const password = "tower fan drive tripped at noon";
    const { code, out } = run(password, db);
    expect(code, out).toBe(0);
    expect(out).toContain(`Created admin ${EMAIL}`);
    expect(await bcrypt.compare(password, storedHash(db)!)).toBe(true);
  });

  it("reads a typed password at a terminal without echoing it", async () => {
    const db = tempDb();
    const password = "condenser strainer cleaned 0612";
    const env: NodeJS.ProcessEnv = { ...process.env, DATABASE_PATH: db };
    delete env.LIFTLINE_ADMIN_PASSWORD;
    // script(1) gives the command a pseudo-terminal, as an operator's shell would.
    const command = [process.execPath, ...ARGS, ...who].map((a) => `'${a}'`).join(" ");
    const child = spawn("script", ["-qec", command, "/dev/null"], { cwd: ROOT, env, stdio: ["pipe", "pipe", "pipe"] });
    let out = "";
    const seen = (text: string) =>
      new Promise<void>((resolve, reject) => {
        const timer = setTimeout(() => reject(new Error(`no "${text}" in:\n${out}`)), 60_000);
        const check = () => {
          if (!out.includes(text)) return;
          clearTimeout(timer);
          child.stdout.off("data", check);
          resolve();
        };
        child.stdout.on("data", check);
        check();
      });
    child.stdout.on("data", (d) => (out += d));
    child.stderr.on("data", (d) => (out += d));
    const exited = new Promise<number | null>((resolve) => child.once("exit", resolve));

    await seen("Password for the new admin");
    child.stdin.write(`${password}\r`);
    await seen("The same password again");
    child.stdin.write(`${password}\r`);
    await seen("Created admin");
    child.stdin.end();
    expect(await exited).toBe(0);
    expect(out).not.toContain(password);
    expect(out).not.toContain("condenser");
    expect(await bcrypt.compare(password, storedHash(db)!)).toBe(true);
  }, 90_000);
});
