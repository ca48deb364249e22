import { z } from "zod";

// Drills on training sites: what an admin or senior technician sends to start one, and the commands a
// trainee may give the simulated plant (a subset of the simulator's drill actions, same shape).

export const drillSpeeds = [1, 10, 60, 600] as const;
export const builtInDrillScenarios = ["power-blip", "condenser-pump-loss", "slow-crossover"] as const;
export const trainingLayouts = ["default", "medical-office", "data-hall", "school"] as const;

/** A built-in scenario or `saved:{id}` (a starting point saved from a real incident). */
export const drillScenarioSchema = z.union([
  z.enum(builtInDrillScenarios),
  z.string().regex(/^saved:[A-Za-z0-9_-]{1,64}$/),
]);

export const startDrillSchema = z.object({
  siteId: z.string().min(1).max(100),
  traineeId: z.string().min(1).max(100),
  scenario: drillScenarioSchema,
  speed: z.union([z.literal(1), z.literal(10), z.literal(60), z.literal(600)]),
  hints: z.boolean(),
  seed: z.number().int().min(0).max(1_000_000).optional(),
});
export type StartDrillBody = z.infer<typeof startDrillSchema>;

/** Timer bounds the controller accepts (common practice, recalled; the same numbers the simulator enforces). */
export const drillTimerLimits = {
  "start-to-start": { min: 120, max: 3600, default: 900 },
  "stop-to-start": { min: 60, max: 1800, default: 180 },
} as const;

const tag = z.string().regex(/^[A-Z]{1,6}-\d{1,3}$/, "an equipment tag such as CH-1");

export const drillCommandBodySchema = z.discriminatedUnion("type", [
  z.object({ type: z.literal("set-fan-drive-mode"), equipment: tag, mode: z.enum(["auto", "off"]) }),
  z.object({ type: z.literal("set-air-handler"), equipment: tag, run: z.boolean() }),
  z.object({
    type: z.literal("set-anti-recycle-timer"),
    equipment: tag,
    timer: z.enum(["start-to-start", "stop-to-start"]),
    seconds: z.number().int(),
  }),
  z.object({ type: z.literal("reset-alarm"), equipment: tag }),
  z.object({ type: z.literal("set-chiller-enable"), equipment: tag, enabled: z.literal(true) }),
]);
export type DrillCommandBody = z.infer<typeof drillCommandBodySchema>;

export const drillListQuerySchema = z.object({
  traineeId: z.string().max(100).optional(),
  siteId: z.string().max(100).optional(),
});

export const createTrainingSiteSchema = z.object({
  name: z.string().trim().min(1).max(120),
  layout: z.enum(trainingLayouts),
  protocol: z.enum(["json", "sparkplug"]).default("json"),
});
export type CreateTrainingSiteBody = z.infer<typeof createTrainingSiteSchema>;

export const saveScenarioSchema = z.object({
  siteId: z.string().min(1).max(100),
  /** Event time whose stored readings become the starting point, ms. */
  atMs: z.number().int().positive(),
  name: z.string().trim().min(1).max(120),
  /** The scenario whose script (the blip, the pump trip…) runs from those conditions. */
  base: z.enum(builtInDrillScenarios),
  fromIncidentId: z.string().max(100).optional(),
});
export type SaveScenarioBody = z.infer<typeof saveScenarioSchema>;
