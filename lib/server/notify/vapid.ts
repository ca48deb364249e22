import fs from "node:fs";
import path from "node:path";
import webpush from "web-push";

// The application server's VAPID key pair (RFC 8292): set in the environment, or generated on
// first start and kept beside the database like the auth secret. Every push subscription is
// bound to the public key, so a new pair would silently orphan every phone's subscription.

export interface VapidKeys {
  publicKey: string;
  privateKey: string;
}

export function resolveVapidKeys(configured: Partial<VapidKeys>, dataDir: string): VapidKeys {
  if (configured.publicKey && configured.privateKey)
    return { publicKey: configured.publicKey, privateKey: configured.privateKey };
  const file = path.join(dataDir, "vapid-keys.json");
  try {
    const existing = JSON.parse(fs.readFileSync(file, "utf8")) as Partial<VapidKeys>;
    if (existing.publicKey && existing.privateKey) {
      if (fs.statSync(file).mode & 0o077) fs.chmodSync(file, 0o600);
      return { publicKey: existing.publicKey, privateKey: existing.privateKey };
    }
  } catch {
    // not there yet
  }
  // Owner-only: whoever holds the private key can push to every subscribed phone.
  fs.mkdirSync(dataDir, { recursive: true, mode: 0o700 });
  const keys = webpush.generateVAPIDKeys();
  fs.writeFileSync(file, JSON.stringify(keys) + "\n", { mode: 0o600 });
  fs.chmodSync(file, 0o600);
  return keys;
}
