import { z } from "zod";

const time = z.union([
  z.iso.datetime({ offset: true }).transform((s) => Date.parse(s)),
  z.coerce.number().int().min(0),
]);

/** The longest window a replay loads (raw readings of every point of a site). */
export const MAX_REPLAY_WINDOW_MS = 24 * 3_600_000;

/** `?from&to` as ISO 8601 or ms since epoch; default the hour before `to` (default now); at most 24 h. */
export const replayQuerySchema = z.object({ from: time.optional(), to: time.optional() });

/** The window `?from&to` asks for, or why it cannot be replayed. */
export function replayWindow(
  q: z.infer<typeof replayQuerySchema>,
  nowMs: number,
): { fromMs: number; toMs: number } | { error: string } {
  const toMs = q.to ?? nowMs;
  const fromMs = q.from ?? toMs - 3_600_000;
  if (fromMs >= toMs) return { error: "`from` must be before `to`." };
  if (toMs - fromMs > MAX_REPLAY_WINDOW_MS) return { error: "A replay window is at most 24 h." };
  return { fromMs, toMs };
}

export const siteParamsSchema = z.object({ siteId: z.string().min(1).max(100) });
