import { describe, expect, it } from "vitest";
import { canonicalIsoMs, fastReading, MAX_POINT_NAME, MAX_TEXT_VALUE, readingSchema } from "@/gateway/contract";

// The ingest checks each reading with fastReading and asks readingSchema only when it declines.
// Parity: fastReading may accept only what the schema accepts, with the same data, so the
// combined verdict (and so every rejection reason and counter) is exactly the schema's.

const out = { tsMs: NaN };
const verdict = (raw: unknown) => {
  const fast = fastReading(raw, out);
  if (fast !== undefined) return { success: true, data: fast };
  const r = readingSchema.safeParse(raw);
  return r.success ? { success: true, data: r.data } : { success: false };
};
const schemaVerdict = (raw: unknown) => {
  const r = readingSchema.safeParse(raw);
  return r.success ? { success: true, data: r.data } : { success: false };
};

const ts = "2026-12-01T14:02:59.500Z";
// The reading-level cases of the bad-input corpus (tests/integration/gateway-json.test.ts) and
// the edges of each rule.
const bad: Array<[string, unknown]> = [
  ["value an object", { point: "CH1-KW", value: { v: 1 } }],
  ["value null", { point: "CH1-KW", value: null }],
  ["value an array", { point: "CH1-KW", value: [1] }],
  ["value missing", { point: "CH1-KW" }],
  ["point missing", { value: 1 }],
  ["point empty", { point: "", value: 1 }],
  ["point name too long", { point: "P".repeat(MAX_POINT_NAME + 1), value: 1 }],
  ["point a number", { point: 7, value: 1 }],
  ["unknown field", { point: "CH1-KW", value: 1, ts, unit: "kW" }],
  ["ts not a time", { point: "CH1-KW", value: 1, ts: "soon" }],
  ["ts without offset", { point: "CH1-KW", value: 1, ts: "2026-12-01T14:02:59" }],
  ["ts without seconds", { point: "CH1-KW", value: 1, ts: "2026-12-01T14:02Z" }],
  ["ts lower-case z", { point: "CH1-KW", value: 1, ts: "2026-12-01T14:02:59z" }],
  ["ts 30 February", { point: "CH1-KW", value: 1, ts: "2026-02-30T00:00:00Z" }],
  ["ts 29 February of a common year", { point: "CH1-KW", value: 1, ts: "2026-02-29T00:00:00Z" }],
  ["ts a number", { point: "CH1-KW", value: 1, ts: 1_700_000_000_000 }],
  ["ts null", { point: "CH1-KW", value: 1, ts: null }],
  ["ts explicitly undefined beside an unknown key", { point: "CH1-KW", value: 1, ts: undefined, x: 1 }],
  ["quality unknown", { point: "CH1-KW", value: 1, ts, quality: "excellent" }],
  ["quality null", { point: "CH1-KW", value: 1, quality: null }],
  ["quality upper case", { point: "CH1-KW", value: 1, quality: "GOOD" }],
  ["text value too long", { point: "CH1-FAULT", value: "f".repeat(MAX_TEXT_VALUE + 1) }],
  ["NaN value (not JSON, but a JS caller could pass it)", { point: "CH1-KW", value: Number.NaN }],
  ["Infinity value", { point: "CH1-KW", value: Number.POSITIVE_INFINITY }],
  ["reading not an object", 42],
  ["reading a string", "CH1-KW=1"],
  ["reading null", null],
  ["reading an array", ["CH1-KW", 1]],
  ["__proto__ key from JSON", JSON.parse('{"point":"CH1-KW","value":1,"__proto__":{"x":1}}')],
];
const good: Array<[string, unknown]> = [
  ["number", { point: "CH1-KW", value: 250.5, ts }],
  ["negative zero", { point: "CH1-KW", value: -0 }],
  ["boolean", { point: "CH1-RUN", value: true, ts, quality: "good" }],
  ["state text", { point: "CT1-MODE", value: "Auto", quality: "uncertain" }],
  ["empty text (the point decides later)", { point: "CH1-FAULT", value: "" }],
  ["text at the limit", { point: "CH1-FAULT", value: "f".repeat(MAX_TEXT_VALUE) }],
  ["point name at the limit", { point: "P".repeat(MAX_POINT_NAME), value: 1 }],
  ["point name of astral characters (UTF-16 length)", { point: "😀".repeat(MAX_POINT_NAME / 2), value: 1 }],
  ["ts with an offset", { point: "CH1-KW", value: 1, ts: "2026-12-01T09:02:59.5-05:00" }],
  ["ts on a leap day", { point: "CH1-KW", value: 1, ts: "2028-02-29T23:59:59Z" }],
  ["quality bad", { point: "CH1-KW", value: 1, ts, quality: "bad" }],
  ["ts explicitly undefined (not JSON)", { point: "CH1-KW", value: 1, ts: undefined }],
];

describe("fastReading parity with readingSchema", () => {
  it.each(bad)("rejects as the schema does: %s", (_name, raw) => {
    expect(schemaVerdict(raw).success).toBe(false);
    expect(fastReading(raw, out)).toBeUndefined();
    expect(verdict(raw)).toEqual(schemaVerdict(raw));
  });

  it.each(good)("accepts as the schema does: %s", (_name, raw) => {
    const s = schemaVerdict(raw);
    expect(s.success).toBe(true);
    expect(verdict(raw)).toEqual(s);
  });

  it("takes the fast path for the common valid readings", () => {
    for (const raw of [
      { point: "CH1-KW", value: 250.5, ts },
      { point: "CH1-RUN", value: false },
      { point: "CT1-MODE", value: "auto", ts, quality: "good" },
    ]) {
      expect(fastReading(raw, out)).toEqual(readingSchema.parse(raw));
    }
  });

  it("agrees with the schema on random combinations of good and bad parts", () => {
    // A small deterministic generator (no dependency), so a failure can be replayed.
    let state = 20261201;
    const rnd = () => (state = (state * 1103515245 + 12345) % 2 ** 31) / 2 ** 31;
    const pick = <T>(xs: readonly T[]) => xs[Math.floor(rnd() * xs.length)];
    const points = ["CH1-KW", "", "P".repeat(MAX_POINT_NAME), "P".repeat(MAX_POINT_NAME + 1), 5, null, undefined];
    const values = [
      1,
      -0,
      1.5e308,
      Number.NaN,
      true,
      "auto",
      "",
      "x".repeat(MAX_TEXT_VALUE + 1),
      null,
      {},
      [],
      undefined,
    ];
    const times = [
      ts,
      "2026-12-01T14:02:59+01:00",
      "2026-13-01T00:00:00Z",
      "2026-12-01 14:02:59Z",
      "2026-02-29T00:00:00.000Z",
      "2024-02-29T23:59:59.999Z",
      "",
      0,
      null,
      undefined,
    ];
    const qualities = ["good", "uncertain", "bad", "Good", "", 1, null, undefined];
    const extras = [undefined, undefined, undefined, ["unit", "kW"], ["seq", 1]] as const;
    for (let i = 0; i < 5000; i++) {
      const raw: Record<string, unknown> = {};
      for (const [key, choices] of [
        ["point", points],
        ["value", values],
        ["ts", times],
        ["quality", qualities],
      ] as const) {
        const v = pick(choices as readonly unknown[]);
        // Absent, or present (sometimes explicitly undefined, which JSON never produces).
        if (v !== undefined || rnd() < 0.2) raw[key] = v;
      }
      const extra = pick(extras);
      if (extra) raw[extra[0]] = extra[1];
      const fast = fastReading(raw, out);
      const s = schemaVerdict(raw);
      if (fast !== undefined) expect({ i, ...s }).toEqual({ i, success: true, data: fast });
      if (fast?.ts !== undefined) expect({ i, tsMs: out.tsMs }).toEqual({ i, tsMs: Date.parse(fast.ts) });
      expect({ i, ...verdict(raw) }).toEqual({ i, ...s });
    }
  });
});

// Event time read by hand for the common form must be exactly what zod accepts and what
// Date.parse (the ECMAScript date-time string format, ECMA-262 §21.4.1.32) reads.
describe("canonical ISO time", () => {
  const cases = [
    ts,
    "2026-01-01T00:00:00.000Z",
    "1999-12-31T23:59:59.999Z",
    "2000-02-29T12:00:00.000Z", // leap (divisible by 400)
    "2100-02-29T12:00:00.000Z", // not leap (century)
    "2028-02-29T12:00:00.000Z", // leap
    "2026-02-29T12:00:00.000Z", // not leap
    "2026-04-31T12:00:00.000Z",
    "2026-04-30T12:00:00.000Z",
    "2026-00-10T12:00:00.000Z",
    "2026-13-10T12:00:00.000Z",
    "2026-12-00T12:00:00.000Z",
    "2026-12-01T24:00:00.000Z",
    "2026-12-01T23:60:00.000Z",
    "2026-12-01T23:59:60.000Z",
    "2026-12-01T14:02:59.5Z",
    "2026-12-01T14:02:59Z",
    "2026-12-01t14:02:59.500Z",
    "2026-12-01T14:02:59.500z",
    "2026-12-01T14:02:59,500Z",
    "2026-1a-01T14:02:59.500Z",
    "+02026-12-01T14:02:59.500",
  ];
  it.each(cases)("%s", (t) => {
    const fast = canonicalIsoMs(t);
    const accepted = readingSchema.safeParse({ point: "P", value: 1, ts: t }).success;
    if (!Number.isNaN(fast)) {
      expect(accepted).toBe(true);
      expect(fast).toBe(Date.parse(t));
    }
    // Whatever the hand reader declines, the reading's verdict and time still match zod's.
    const r = fastReading({ point: "P", value: 1, ts: t }, out);
    expect(r !== undefined).toBe(accepted);
    if (r) expect(out.tsMs).toBe(Date.parse(t));
  });
});
