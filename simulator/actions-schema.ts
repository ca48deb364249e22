// Drill actions a trainer or the command topic can apply to the simulated plant (validated with zod).
import { z } from "zod";
import { fanDriveModes } from "@/lib/quantities";

export const antiRecycleTimers = ["start-to-start", "stop-to-start"] as const;

export const drillActionSchema = z.discriminatedUnion("type", [
  z.object({
    type: z.literal("set-fan-drive-mode"),
    equipment: z.string().min(1),
    mode: z.enum(fanDriveModes),
    handHz: z.number().min(0).max(60).optional(),
  }),
  z.object({ type: z.literal("reset-alarm"), equipment: z.string().min(1) }),
  z.object({
    type: z.literal("set-anti-recycle-timer"),
    equipment: z.string().min(1),
    timer: z.enum(antiRecycleTimers),
    seconds: z.number(),
  }),
  z.object({ type: z.literal("set-air-handler"), equipment: z.string().min(1), run: z.boolean() }),
  z.object({ type: z.literal("set-chiller-enable"), equipment: z.string().min(1), enabled: z.boolean() }),
  z.object({
    type: z.literal("set-tower-bypass"),
    equipment: z.string().min(1),
    /** Share of the condenser water sent past the tower fill, % (0 = all over the fill). */
    positionPct: z.number().min(0).max(100),
  }),
]);

export type DrillAction = z.infer<typeof drillActionSchema>;

/** A command message on `liftline/{gatewayId}/commands`: either a bare action or `{ id?, action }`. */
export const drillCommandSchema = z.union([
  z.object({ id: z.string().max(100).optional(), action: drillActionSchema }),
  drillActionSchema,
]);
export type DrillCommand = z.infer<typeof drillCommandSchema>;

export function actionOfCommand(cmd: DrillCommand): { id?: string; action: DrillAction } {
  return "action" in cmd ? { id: cmd.id, action: cmd.action } : { action: cmd };
}

/** Controller limits for the anti-recycle timers, seconds (common practice, from a field service call). */
export const timerLimits = {
  "start-to-start": { min: 120, max: 3600, default: 900 },
  "stop-to-start": { min: 60, max: 1800, default: 180 },
} as const;
