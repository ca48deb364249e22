"use client";

import { z } from "zod";

// Zod compiles object parsers with `new Function` where it may; the Content-Security-Policy
// forbids eval, so in the browser it parses without compiling (and without probing for eval).
z.config({ jitless: true });

/** Mounted once in the root layout so the setting applies before any form parses. */
export function ZodWithoutEval() {
  return null;
}
