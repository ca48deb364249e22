import { z } from "zod";

/** The caller passes the scenario names: the catalogue lives in simulator/, which lib does not import. */
export function startRunSchemaFor(scenarioNames: readonly string[]) {
  return z.object({
    scenario: z.enum(scenarioNames as [string, ...string[]], { error: "Unknown scenario" }),
    speed: z.number().min(1, "At least 1×").max(120, "At most 120×"),
    seed: z.number().int().min(0).max(1_000_000).optional(),
  });
}
export type StartRunInput = z.infer<ReturnType<typeof startRunSchemaFor>>;
