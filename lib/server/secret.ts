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
    if (existing.length >= 32) {
      if (fs.statSync(file).mode & 0o077) fs.chmodSync(file, 0o600);
      return existing;
    }
  } catch {
    // not there yet
  }
  // Owner-only, like the database beside it: whoever reads the secret can forge sessions.
  fs.mkdirSync(dataDir, { recursive: true, mode: 0o700 });
  const secret = randomBytes(32).toString("base64url");
  fs.writeFileSync(file, secret + "\n", { mode: 0o600 });
  fs.chmodSync(file, 0o600);
  return secret;
}
