import { randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";

/**
 * The session-signing secret: AUTH_SECRET when set, otherwise one generated on first start
 * and kept beside the database so sessions survive restarts on a single local machine.
 */
export function resolveAuthSecret(configured: string | undefined, dataDir: string): string {
  if (configured) return configured;
  const file = path.join(dataDir, "auth-secret");
  try {
    const existing = fs.readFileSync(file, "utf8").trim();
    if (existing.length >= 32) return existing;
  } catch {
    // not there yet
  }
  fs.mkdirSync(dataDir, { recursive: true });
  const secret = randomBytes(32).toString("base64url");
  fs.writeFileSync(file, secret + "\n", { mode: 0o600 });
  return secret;
}
