import { beforeEach, describe, expect, it, vi } from "vitest";
import { checkGatewayPassword, hashGatewayPassword, type HashGate } from "@/gateway/credential-hash";
import { checkOnWorker } from "@/gateway/credential-pool";

// Gateway password hashes: scrypt for new ones, bcrypt from before still accepted and replaced,
// and a password that matched once in this process not hashed again. Known answers: RFC 7914
// §12 (scrypt) and jBCrypt's test vectors (bcrypt).

vi.mock("@/gateway/credential-pool", async (importOriginal) => {
  const actual = await importOriginal<typeof import("@/gateway/credential-pool")>();
  return { ...actual, checkOnWorker: vi.fn(actual.checkOnWorker) };
});
const checks = () => vi.mocked(checkOnWorker).mock.calls.length;
const b64 = (b: Buffer) => b.toString("base64").replace(/=+$/, "");
const gate = (allow: boolean): HashGate & { asked: number } => ({
  asked: 0,
  mayHash() {
    this.asked++;
    return allow;
  },
  settled() {},
});

beforeEach(() => {
  vi.mocked(checkOnWorker).mockClear();
});

describe("gateway password hashes", () => {
  it("reads the scrypt string format: RFC 7914 §12's second test vector verifies", async () => {
    const key = Buffer.from(
      "fdbabe1c9d3472007856e7190d01e9fe7c6ad7cbc8237830e77376634b3731622eaf30d92e22a3886ff109279d9830dac727afb94a83ee6d8360cbdfa2cc0640",
      "hex",
    );
    // scrypt(P="password", S="NaCl", N=1024, r=8, p=16, dkLen=64)
    const hash = `$scrypt$ln=10,r=8,p=16$${b64(Buffer.from("NaCl"))}$${b64(key)}`;
    const ok = await checkGatewayPassword("password", { key: "rfc-7914", hash });
    expect(ok).toMatchObject({ ok: true });
    // Other parameters than the current ones: replaced by a current hash of the same password.
    const rehashed = (ok as { rehashed: string }).rehashed;
    expect(rehashed).toMatch(/^\$scrypt\$ln=10,r=8,p=1\$/);
    expect(await checkGatewayPassword("password", { key: "rfc-7914-b", hash: rehashed })).toEqual({
      ok: true,
      rehashed: null,
    });
    expect(await checkGatewayPassword("Password", { key: "rfc-7914-c", hash })).toEqual({ ok: false });
  });

  it("salts every new hash and checks it", async () => {
    const a = await hashGatewayPassword("same-secret");
    const b = await hashGatewayPassword("same-secret");
    expect(a).not.toBe(b);
    expect(await checkGatewayPassword("same-secret", { key: "new-a", hash: a })).toEqual({ ok: true, rehashed: null });
    expect(await checkGatewayPassword("other-secret", { key: "new-b", hash: b })).toEqual({ ok: false });
  });

  it("checks a bcrypt hash from before off the event loop and replaces it with scrypt", async () => {
    // jBCrypt TestBCrypt: "abc" with salt $2a$06$If6bvum7DFjUnE9p2uDeDu.
    const bcryptHash = "$2a$06$If6bvum7DFjUnE9p2uDeDu0YHzrHM6tf.iqN8.yx.jNN1ILEf7h0i";
    expect(await checkGatewayPassword("abd", { key: "old-a", hash: bcryptHash })).toEqual({ ok: false });
    const ok = await checkGatewayPassword("abc", { key: "old-b", hash: bcryptHash });
    expect(ok).toMatchObject({ ok: true, rehashed: expect.stringMatching(/^\$scrypt\$ln=10,r=8,p=1\$/) });
  });

  it("does not hash again a password that matched this stored hash before, and forgets it when the hash changes", async () => {
    const first = await hashGatewayPassword("gateway-secret");
    await checkGatewayPassword("gateway-secret", { key: "gw-remembered", hash: first });
    vi.mocked(checkOnWorker).mockClear();
    const g = gate(false);
    // Remembered: no hash, and the limiter is not asked (a working gateway is never shut out).
    expect(await checkGatewayPassword("gateway-secret", { key: "gw-remembered", hash: first }, g)).toEqual({
      ok: true,
      rehashed: null,
    });
    expect(checks()).toBe(0);
    expect(g.asked).toBe(0);
    // A wrong password is hashed as ever.
    expect(await checkGatewayPassword("gateway-secreT", { key: "gw-remembered", hash: first })).toEqual({ ok: false });
    expect(checks()).toBe(1);
    // Rotated: the stored hash is another, so the old password is checked against it and fails.
    const rotated = await hashGatewayPassword("new-secret");
    vi.mocked(checkOnWorker).mockClear();
    expect(await checkGatewayPassword("gateway-secret", { key: "gw-remembered", hash: rotated })).toEqual({
      ok: false,
    });
    expect(checks()).toBe(1);
  });

  it("hashes for an unknown gateway too, and hashes nothing when the gate refuses", async () => {
    expect(await checkGatewayPassword("whatever", null)).toEqual({ ok: false });
    expect(checks()).toBe(1);
    // A damaged or foreign hash matches nothing, whatever it says (N = 2^30 would want a TiB).
    expect(await checkGatewayPassword("-", { key: "gw-damaged", hash: "-" })).toEqual({ ok: false });
    const huge = `$scrypt$ln=30,r=8,p=1$${b64(Buffer.alloc(16))}$${b64(Buffer.alloc(32))}`;
    expect(await checkGatewayPassword("x", { key: "gw-damaged", hash: huge })).toEqual({ ok: false });
    vi.mocked(checkOnWorker).mockClear();
    const stored = { key: "gw-limited", hash: await hashGatewayPassword("right") };
    vi.mocked(checkOnWorker).mockClear();
    expect(await checkGatewayPassword("right", stored, gate(false))).toBe("limited");
    expect(await checkGatewayPassword("whatever", null, gate(false))).toBe("limited");
    expect(checks()).toBe(0);
  });
});
