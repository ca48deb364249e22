import { z } from "zod";

// Zod probes for eval with `new Function` when it builds its first object schema; under the
// Content-Security-Policy (no 'unsafe-eval' in production, lib/server/security-headers.ts) the
// browser reports that probe as a violation even though zod catches it. Jitless parsing skips the
// probe. This file runs before the app's own client code (Next.js: instrumentation-client).
z.config({ jitless: true });
