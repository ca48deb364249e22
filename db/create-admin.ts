// `npm run create-admin -- --email a@b.example --name "A B" --organization "Company"`
// Creates the first admin of a real deployment (LIFTLINE_DEMO=0), and the service company
// organization if there is none yet. The password comes from LIFTLINE_ADMIN_PASSWORD (scripts)
// or a terminal prompt that does not echo it, and must pass the password policy.
import { randomUUID } from "node:crypto";
import path from "node:path";
import { parseArgs } from "node:util";
import { eq } from "drizzle-orm";
import { z } from "zod";
import { safeText } from "@/lib/schemas/text";
import { COMMON_PASSWORDS } from "@/lib/auth/common-passwords";
import { DEFAULT_DEMO_PASSWORD, passwordProblems, PASSWORD_MIN_LENGTH } from "@/lib/auth/password-policy";
import { migrateDb, openDb } from "./client";
import { createUser } from "./queries/users";
import { organizations } from "./schema";

const argsSchema = z.object({
  email: z.email("--email must be an e-mail address"),
  name: safeText(z.string().trim().min(1, "--name is required").max(100)),
  organization: safeText(z.string().trim().min(1, "--organization is required").max(100)),
});

const envSchema = z.object({
  LIFTLINE_ADMIN_PASSWORD: z.string().optional(),
  LIFTLINE_DEMO_PASSWORD: z.string().default(DEFAULT_DEMO_PASSWORD),
  DATABASE_PATH: z.string().min(1).default("data/liftline.db"),
});

/** Reads a line from the terminal with echo off (raw mode: nothing typed is written back). */
function promptHidden(question: string): Promise<string> {
  const input = process.stdin;
  // Echo goes off before the question shows, so nothing typed after it is written back.
  input.setRawMode(true);
  input.setEncoding("utf8");
  input.resume();
  process.stdout.write(question);
  return new Promise((resolve, reject) => {
    let value = "";
    const finish = () => {
      input.off("data", onData);
      input.setRawMode(false);
      input.pause();
      process.stdout.write("\n");
    };
    const onData = (chunk: string) => {
      for (const ch of chunk) {
        if (ch === "\r" || ch === "\n" || ch === "\u0004") {
          finish();
          return resolve(value);
        }
        if (ch === "\u0003") {
          finish();
          return reject(new Error("Cancelled."));
        }
        if (ch === "\u007f" || ch === "\b") value = [...value].slice(0, -1).join("");
        else if (ch >= " ") value += ch;
      }
    };
    input.on("data", onData);
  });
}

/** The password from the environment, or asked (twice) until it passes the policy. */
async function choosePassword(email: string, env: z.infer<typeof envSchema>): Promise<string> {
  const check = (password: string) =>
    passwordProblems(password, { commonPasswords: COMMON_PASSWORDS, email, demoPassword: env.LIFTLINE_DEMO_PASSWORD });
  if (env.LIFTLINE_ADMIN_PASSWORD !== undefined) {
    const problems = check(env.LIFTLINE_ADMIN_PASSWORD);
    if (!problems.length) return env.LIFTLINE_ADMIN_PASSWORD;
    console.error("LIFTLINE_ADMIN_PASSWORD is not accepted:");
    for (const p of problems) console.error(`  ${p.message}`);
    process.exit(2);
  }
  if (!process.stdin.isTTY) {
    console.error("No terminal to ask for the password: set LIFTLINE_ADMIN_PASSWORD.");
    process.exit(2);
  }
  for (;;) {
    const password = await promptHidden(`Password for the new admin (${PASSWORD_MIN_LENGTH}+ characters, not shown): `);
    const problems = check(password);
    if (problems.length) {
      for (const p of problems) console.error(`  ${p.message}`);
      continue;
    }
    if ((await promptHidden("The same password again: ")) === password) return password;
    console.error("  The two did not match; once more.");
  }
}

async function main() {
  const { values } = parseArgs({
    options: { email: { type: "string" }, name: { type: "string" }, organization: { type: "string" } },
  });
  const parsed = argsSchema.safeParse(values);
  if (!parsed.success) {
    for (const issue of parsed.error.issues) console.error(issue.message);
    process.exit(2);
  }
  const env = envSchema.parse(process.env);
  const password = await choosePassword(parsed.data.email, env).catch((err: Error) => {
    console.error(err.message);
    process.exit(130);
  });
  const db = openDb(path.resolve(env.DATABASE_PATH));
  migrateDb(db);
  let org = db
    .select({ id: organizations.id, name: organizations.name })
    .from(organizations)
    .where(eq(organizations.kind, "service"))
    .get();
  if (!org) {
    org = { id: randomUUID(), name: parsed.data.organization };
    db.insert(organizations)
      .values({ ...org, kind: "service" })
      .run();
  }
  try {
    const admin = await createUser(db, { ...parsed.data, password, role: "admin", organizationId: org.id });
    console.log(`Created admin ${admin.email} in ${org.name}.`);
  } catch (err) {
    console.error(/UNIQUE/.test(String(err)) ? "A user with that e-mail already exists." : err);
    process.exit(1);
  } finally {
    db.$client.close();
  }
}

void main();
