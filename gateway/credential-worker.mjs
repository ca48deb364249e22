// A thread that checks gateway passwords against their stored hashes (gateway/credential-pool.ts),
// so the event loop does none of it: scrypt strings (`$scrypt$ln=…,r=…,p=…$salt$key`, written by
// gateway/credential-hash.ts) through node's crypto, and bcrypt through bcryptjs, which is plain
// JavaScript and holds its thread for tens of milliseconds a check. Plain JavaScript, so it needs
// no loader.
import { Buffer } from "node:buffer";
import { scryptSync, timingSafeEqual } from "node:crypto";
import { parentPort } from "node:worker_threads";
import bcrypt from "bcryptjs";

const SCRYPT = /^\$scrypt\$ln=(\d{1,2}),r=(\d{1,2}),p=(\d{1,2})\$([A-Za-z0-9+/]+)\$([A-Za-z0-9+/]+)$/;

function matches(password, hash) {
  if (/^\$2[aby]\$\d\d\$/.test(hash)) return bcrypt.compareSync(password, hash);
  const m = SCRYPT.exec(hash);
  if (!m) return false;
  const [ln, r, p] = [Number(m[1]), Number(m[2]), Number(m[3])];
  // Bounds keep a damaged row from asking for gigabytes.
  if (ln < 1 || ln > 20 || r < 1 || r > 32 || p < 1 || p > 16) return false;
  const salt = Buffer.from(m[4], "base64");
  const key = Buffer.from(m[5], "base64");
  if (salt.length < 4 || key.length < 16) return false;
  const N = 2 ** ln;
  return timingSafeEqual(scryptSync(password, salt, key.length, { N, r, p, maxmem: 256 * N * r * p }), key);
}

parentPort.on("message", ({ id, password, hash }) => {
  let ok = false;
  try {
    ok = matches(password, hash);
  } catch {
    // A malformed hash matches nothing.
  }
  parentPort.postMessage({ id, ok });
});
