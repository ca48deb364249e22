import { createHmac, randomBytes, scrypt, timingSafeEqual } from "node:crypto";
import { CHECK_THREADS, checkOnWorker } from "./credential-pool";

// Gateway password hashes, and the memory of passwords already checked in this process.
//
// A gateway's password is 192 random bits made by the server (db/queries/gateways.ts), so its
// strength is the secret's own: no work factor makes 2^192 guesses any more or less out of
// reach (NIST SP 800-63B §5.1.2.2 asks an approved one-way function, not a slow one, of
// look-up secrets of ≥ 112 bits; recalled, not verified). The hash is still a salted,
// memory-hard scrypt (RFC 7914), at a cost that lets 500 gateways reconnecting at once be
// checked in about a core-second, on worker threads (gateway/credential-pool.ts). Its
// parameters are in the stored string, so a hash made at other settings still verifies and is
// replaced at its next successful check, as bcrypt hashes from before are.

/** log2 N, r, p (RFC 7914 §2): 1 MiB and about a millisecond a hash on this project's machine. */
const CURRENT = { ln: 10, r: 8, p: 1 } as const;
const KEY_BYTES = 32;
const SALT_BYTES = 16;
const CURRENT_PREFIX = `$scrypt$ln=${CURRENT.ln},r=${CURRENT.r},p=${CURRENT.p}$`;
/** What the check thread reads (gateway/credential-worker.mjs); anything else matches nothing. */
const CHECKABLE = /^(\$scrypt\$|\$2[aby]\$\d\d\$)/;

/** A stored credential: `key` names it in the memory of checked passwords (the gateway id). */
export interface StoredCredential {
  key: string;
  hash: string;
}

/**
 * Asked just before a password is hashed, so refused attempts cost nothing; told whether the
 * attempt was admitted once it is decided (gateway/connect-limiter.ts).
 */
export interface HashGate {
  mayHash(): boolean;
  settled(admitted: boolean): void;
}

export type PasswordCheck = { ok: false } | { ok: true; rehashed: string | null };

// Checks wait here, two per check thread in progress (one running, the next queued so the
// thread never waits on the event loop), and ask the gate again when their turn comes: a burst
// that arrived at once is cut off at the limit, not after it.
const SLOTS = 2 * CHECK_THREADS;
let checking = 0;
const queue: Array<() => void> = [];
type Release = () => void;

/** A check slot, at once when one is free (no promise: a storm makes hundreds of these). */
function checkSlot(): Release | Promise<Release> {
  if (checking < SLOTS) {
    checking++;
    return release;
  }
  return new Promise<Release>((resolve) => queue.push(() => resolve(release)));
}

// A released slot passes straight to the next waiter, so `checking` counts it still.
function release() {
  const next = queue.shift();
  if (next) next();
  else checking--;
}

const b64 = (b: Buffer) => b.toString("base64").replace(/=+$/, "");

/**
 * An scrypt hash of a new password, in the PHC string format (`$scrypt$ln=…,r=…,p=…$salt$key`),
 * on libuv's pool: provisioning and rotation are rare, and route handlers start no threads.
 */
export async function hashGatewayPassword(password: string): Promise<string> {
  const salt = randomBytes(SALT_BYTES);
  const N = 2 ** CURRENT.ln;
  const { r, p } = CURRENT;
  const key = await new Promise<Buffer>((resolve, reject) =>
    scrypt(password, salt, KEY_BYTES, { N, r, p, maxmem: 256 * N * r * p }, (err, k) =>
      err ? reject(err) : resolve(k),
    ),
  );
  return `${CURRENT_PREFIX}${b64(salt)}$${b64(key)}`;
}

// Passwords that matched in this process, as an HMAC under a key that never leaves it, with
// the hash they matched: a rotated or replaced hash no longer agrees, so nothing is kept for it.
const memoryKey = randomBytes(32);
const remembered = new Map<string, { hash: string; mac: Buffer }>();
const mac = (password: string) => createHmac("sha256", memoryKey).update(password).digest();

function isRemembered(stored: StoredCredential, password: string): boolean {
  const r = remembered.get(stored.key);
  return r !== undefined && r.hash === stored.hash && timingSafeEqual(r.mac, mac(password));
}

/** Checked against when there is no gateway, so an unknown user name costs a check too. */
const DUMMY_HASH = `${CURRENT_PREFIX}${b64(randomBytes(SALT_BYTES))}$${b64(randomBytes(KEY_BYTES))}`;

/**
 * Whether `password` matches the stored hash (null: no such gateway, which costs a hash all
 * the same). A password that matched this stored hash before in this process is not hashed
 * again and does not ask the gate. `rehashed` is the scrypt hash to store in place of a bcrypt
 * one or one at other settings. "limited" when the gate refused: nothing was hashed.
 */
export async function checkGatewayPassword(
  password: string,
  stored: StoredCredential | null,
  gate?: HashGate,
): Promise<PasswordCheck | "limited"> {
  if (stored && isRemembered(stored, password)) return { ok: true, rehashed: null };
  if (gate && !gate.mayHash()) return "limited";
  const checkable = stored !== null && CHECKABLE.test(stored.hash);
  const slot = checkSlot();
  const done = typeof slot === "function" ? slot : await slot;
  let ok: boolean;
  try {
    // Asked again: attempts that queued behind others may have been refused meanwhile.
    if (gate && !gate.mayHash()) return "limited";
    ok = (await checkOnWorker(password, checkable ? stored.hash : DUMMY_HASH)) && checkable;
  } finally {
    done();
  }
  if (!ok || !stored) return { ok: false };
  const rehashed = stored.hash.startsWith(CURRENT_PREFIX) ? null : await hashGatewayPassword(password);
  remembered.set(stored.key, { hash: rehashed ?? stored.hash, mac: mac(password) });
  return { ok: true, rehashed };
}
