import { z } from "zod";
import { scenarioNames } from "@/simulator/scenarios";

export const startRunSchema = z.object({
  scenario: z.enum(scenarioNames as [string, ...string[]], { error: "Unknown scenario" }),
  speed: z.number().min(1, "At least 1×").max(120, "At most 120×"),
  seed: z.number().int().min(0).max(1_000_000).optional(),
});
export type StartRunInput = z.infer<typeof startRunSchema>;
