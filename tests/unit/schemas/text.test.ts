import { describe, expect, it } from "vitest";
import { parsePointMapCsv } from "@/lib/point-map-csv";
import { ackSchema, noteSchema, shelveSchema, unshelveSchema } from "@/lib/schemas/alarms";
import { createGatewaySchema } from "@/lib/schemas/gateways";
import { hasUnsafeText, UNSAFE_TEXT_MESSAGE } from "@/lib/schemas/text";
import { createTokenSchema } from "@/lib/schemas/tokens";

// Bidirectional embeddings, overrides and isolates (U+202A–U+202E, U+2066–U+2069: Unicode TR #36
// §2.1, CVE-2021-42574 "Trojan Source") and lone surrogates (RFC 8259 §8.2) in free text.
const RLO = "\u202e";
const unsafe = [
  `Checked ${RLO}evird eht`,
  "a\u202ab",
  "a\u202cb",
  "a\u2066b",
  "a\u2069b",
  "broken \ud800 text",
  "broken \udc00 text",
  "end \ud83d",
];
const fine = ["Réglé, pompe 2", "Drive ✓ 👍", "שלום and English", "مرحبا", "tab\tand\nnew line", "arrow → ←"];

describe("free-text hygiene", () => {
  it("finds bidirectional controls and lone surrogates, and nothing in ordinary text of any script", () => {
    for (const t of unsafe) expect(hasUnsafeText(t), JSON.stringify(t)).toBe(true);
    for (const t of fine) expect(hasUnsafeText(t), t).toBe(false);
  });

  it("is applied to every free-text field: notes, reasons, gateway and token names, point-map names", () => {
    const fields: Array<[string, (text: string) => { success: boolean; error?: { issues: { message: string }[] } }]> = [
      ["acknowledge note", (t) => ackSchema.safeParse({ note: t })],
      ["alarm note", (t) => noteSchema.safeParse({ text: t, visibility: "internal" })],
      ["shelve reason", (t) => shelveSchema.safeParse({ minutes: 10, reason: t })],
      ["unshelve note", (t) => unshelveSchema.safeParse({ note: t })],
      ["gateway name", (t) => createGatewaySchema.safeParse({ siteId: "s", name: t, protocol: "json" })],
      ["token name", (t) => createTokenSchema.safeParse({ name: t })],
    ];
    for (const [field, parse] of fields) {
      for (const t of unsafe) {
        const r = parse(t);
        expect(r.success, `${field}: ${JSON.stringify(t)}`).toBe(false);
        expect(r.error?.issues[0].message).toBe(UNSAFE_TEXT_MESSAGE);
      }
      for (const t of fine) expect(parse(t).success, `${field}: ${t}`).toBe(true);
    }
    const csv = `gateway_point,equipment,quantity,unit\nCH1-KW,CH-1${RLO},compressor_power,kW\nCH1${RLO}-X,CH-1,compressor_power,kW\n`;
    expect(parsePointMapCsv(csv).errors.map((e) => e.line)).toEqual([2, 3]);
  });
});
