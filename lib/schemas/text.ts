import { z } from "zod";

// Free text people type (notes, reasons, names) is shown to other people later. Two kinds of
// character are refused there:
// - bidirectional embeddings, overrides and isolates (U+202A–U+202E, U+2066–U+2069), which make
//   text display in an order other than the one stored (Unicode TR #36 §2.1; CVE-2021-42574);
// - lone UTF-16 surrogates, which are no character at all and turn into U+FFFD or errors when
//   the text is encoded (RFC 8259 §8.2; WHATWG Encoding, "USVString").

const BIDI_CONTROLS = /[\u202A-\u202E\u2066-\u2069]/;
const LONE_SURROGATE = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

export const UNSAFE_TEXT_MESSAGE = "Contains invisible direction-changing characters or broken characters";

/** True when `text` holds a bidirectional control or a lone surrogate. */
export function hasUnsafeText(text: string): boolean {
  return BIDI_CONTROLS.test(text) || LONE_SURROGATE.test(text);
}

/** A free-text field: the given string schema, refusing what `hasUnsafeText` finds. */
export function safeText<T extends z.ZodString>(schema: T): T {
  return schema.refine((v) => !hasUnsafeText(v), { message: UNSAFE_TEXT_MESSAGE }) as T;
}
