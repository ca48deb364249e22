import { z } from "zod";

const time = z.union([
  z.iso.datetime({ offset: true }).transform((s) => Date.parse(s)),
  z.coerce.number().int().min(0),
]);

/** `?from&to` as ISO 8601 or ms since epoch; at most maxPoints buckets. */
export const seriesQuerySchema = z.object({
  from: time.optional(),
  to: time.optional(),
  maxPoints: z.coerce.number().int().min(2).max(5000).default(1000),
});

export const pointParamsSchema = z.object({ pointId: z.coerce.number().int().positive() });
