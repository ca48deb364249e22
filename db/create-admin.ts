// `npm run create-admin -- --email a@b.example --name "A B" --organization "Company"`
// Creates the first admin of a real deployment (LIFTLINE_DEMO=0), and the service company
// organization if there is none yet. The password comes from LIFTLINE_ADMIN_PASSWORD or a prompt.
import { randomUUID } from "node:crypto";
import path from "node:path";
import { createInterface } from "node:readline/promises";
import { parseArgs } from "node:util";
import { eq } from "drizzle-orm";
import { z } from "zod";
import { safeText } from "@/lib/schemas/text";
import { migrateDb, openDb } from "./client";
import { createUser } from "./queries/users";
import { organizations } from "./schema";

const argsSchema = z.object({
  email: z.email("--email must be an e-mail address"),
  name: safeText(z.string().trim().min(1, "--name is required").max(100)),
  organization: safeText(z.string().trim().min(1, "--organization is required").max(100)),
  password: z.string().min(12, "the password must be at least 12 characters"),
});

async function main() {
  const { values } = parseArgs({
    options: { email: { type: "string" }, name: { type: "string" }, organization: { type: "string" } },
  });
  let password = process.env.LIFTLINE_ADMIN_PASSWORD;
  if (!password) {
    const rl = createInterface({ input: process.stdin, output: process.stdout });
    password = await rl.question("Password for the new admin (12+ characters): ");
    rl.close();
  }
  const parsed = argsSchema.safeParse({ ...values, password });
  if (!parsed.success) {
    for (const issue of parsed.error.issues) console.error(issue.message);
    process.exit(2);
  }
  const db = openDb(path.resolve(process.env.DATABASE_PATH ?? "data/liftline.db"));
  migrateDb(db);
  let org = db.select().from(organizations).where(eq(organizations.kind, "service")).get();
  if (!org) {
    org = { id: randomUUID(), name: parsed.data.organization, kind: "service", createdAt: new Date() };
    db.insert(organizations).values(org).run();
  }
  try {
    const admin = await createUser(db, { ...parsed.data, role: "admin", organizationId: org.id });
    console.log(`Created admin ${admin.email} in ${org.name}.`);
  } catch (err) {
    console.error(/UNIQUE/.test(String(err)) ? "A user with that e-mail already exists." : err);
    process.exit(1);
  } finally {
    db.$client.close();
  }
}

void main();
