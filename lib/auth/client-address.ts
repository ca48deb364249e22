// The client's address for sign-in limits. Behind a reverse proxy every request comes from the
// proxy, so its X-Forwarded-For says who the client was — but only a proxy we trust may say so:
// anyone can send the header (OWASP Web Security Testing Guide, "Testing for IP spoofing via
// X-Forwarded-For"; RFC 7239 §8.3). `TRUSTED_PROXY` is either a count of proxy hops in front of
// the server or a list of the proxies' addresses and CIDR ranges.

export type TrustedProxies =
  | { kind: "none" }
  | { kind: "hops"; hops: number }
  | { kind: "list"; ranges: ReadonlyArray<{ bytes: Uint8Array; prefix: number }> };

const MAX_HOPS = 10;
const MAX_ADDRESS_CHARS = 100;

function parseIPv4(s: string): number[] | null {
  const parts = s.split(".");
  if (parts.length !== 4) return null;
  const out: number[] = [];
  for (const p of parts) {
    if (!/^\d{1,3}$/.test(p) || Number(p) > 255) return null;
    out.push(Number(p));
  }
  return out;
}

/** 16 bytes of an IPv6 address (IPv4 as IPv4-mapped), or null. */
export function addressBytes(address: string): Uint8Array | null {
  const s = address
    .trim()
    .replace(/^\[|\]$/g, "")
    .replace(/%.*$/, "");
  const v4 = parseIPv4(s);
  if (v4) return Uint8Array.from([0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0xff, 0xff, ...v4]);
  if (!s.includes(":")) return null;
  // A trailing dotted quad (`::ffff:10.0.0.1`) stands for the last two groups.
  const lastColon = s.lastIndexOf(":");
  const dotted = s.slice(lastColon + 1);
  let text = s;
  if (dotted.includes(".")) {
    const v = parseIPv4(dotted);
    if (!v) return null;
    text = `${s.slice(0, lastColon + 1)}${((v[0] << 8) | v[1]).toString(16)}:${((v[2] << 8) | v[3]).toString(16)}`;
  }
  const halves = text.split("::");
  if (halves.length > 2) return null;
  const groups = (h: string) => (h === "" ? [] : h.split(":"));
  const left = groups(halves[0]);
  const right = halves.length === 2 ? groups(halves[1]) : [];
  const fill = halves.length === 2 ? 8 - left.length - right.length : 0;
  if (fill < 0 || left.length + fill + right.length !== 8) return null;
  const all = [...left, ...Array<string>(fill).fill("0"), ...right];
  const out = new Uint8Array(16);
  for (let i = 0; i < 8; i++) {
    if (!/^[0-9a-f]{1,4}$/i.test(all[i])) return null;
    const n = parseInt(all[i], 16);
    out[i * 2] = n >> 8;
    out[i * 2 + 1] = n & 0xff;
  }
  return out;
}

/** The usual spelling of an address: IPv4-mapped IPv6 (`::ffff:10.0.0.1`) as plain IPv4. */
export function normalizeAddress(address: string): string {
  const bytes = addressBytes(address);
  if (!bytes) return address.trim().slice(0, MAX_ADDRESS_CHARS);
  if (bytes.slice(0, 12).every((b, i) => b === (i >= 10 ? 0xff : 0))) return bytes.slice(12).join(".");
  return address
    .trim()
    .replace(/^\[|\]$/g, "")
    .toLowerCase();
}

/** Reads `TRUSTED_PROXY`: empty for none, a hop count (`1`), or addresses and ranges (`10.0.0.5, 192.168.0.0/16, ::1`). */
export function parseTrustedProxy(value: string | undefined): TrustedProxies {
  const v = (value ?? "").trim();
  if (v === "" || v === "0") return { kind: "none" };
  if (/^\d+$/.test(v)) {
    const hops = Number(v);
    if (hops > MAX_HOPS) throw new Error(`a hop count is at most ${MAX_HOPS}`);
    return { kind: "hops", hops };
  }
  const ranges = v.split(",").map((entry) => {
    const [addr, prefixText, extra] = entry.trim().split("/");
    const bytes = addressBytes(addr);
    if (!bytes || extra !== undefined) throw new Error(`"${entry.trim()}" is not an IP address or CIDR range`);
    const v4 = parseIPv4(addr.trim()) !== null;
    const given = prefixText === undefined ? (v4 ? 32 : 128) : Number(prefixText);
    if (!Number.isInteger(given) || given < 0 || given > (v4 ? 32 : 128) || !/^\d*$/.test(prefixText ?? ""))
      throw new Error(`"${entry.trim()}" has a prefix length out of range`);
    return { bytes, prefix: v4 ? given + 96 : given };
  });
  return { kind: "list", ranges };
}

function inRange(bytes: Uint8Array, range: { bytes: Uint8Array; prefix: number }): boolean {
  for (let bit = 0; bit < range.prefix; bit += 8) {
    const take = Math.min(8, range.prefix - bit);
    const mask = (0xff << (8 - take)) & 0xff;
    if ((bytes[bit / 8] & mask) !== (range.bytes[bit / 8] & mask)) return false;
  }
  return true;
}

/**
 * The client address of a request that reached the server from `peer`. X-Forwarded-For is read
 * from the right (each proxy appends the address it was reached from) and only as far as the
 * addresses are trusted proxies; the first one that is not is the client.
 */
export function clientAddress(
  peer: string | undefined,
  forwardedFor: string | string[] | undefined,
  trust: TrustedProxies,
): string {
  const socketAddress = normalizeAddress(peer ?? "unknown");
  if (trust.kind === "none") return socketAddress;
  const forwarded = (Array.isArray(forwardedFor) ? forwardedFor.join(",") : (forwardedFor ?? ""))
    .split(",")
    .map((a) => a.trim())
    .filter(Boolean)
    .map(normalizeAddress);
  // Nearest first: the socket's peer, then X-Forwarded-For from its right end.
  const chain = [socketAddress, ...forwarded.reverse()];
  if (trust.kind === "hops") return chain[Math.min(trust.hops, chain.length - 1)];
  for (const address of chain) {
    const bytes = addressBytes(address);
    if (!bytes || !trust.ranges.some((r) => inRange(bytes, r))) return address;
  }
  return chain[chain.length - 1];
}
