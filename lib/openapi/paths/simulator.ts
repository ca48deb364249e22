import type { z } from "zod";
import type { Operation } from "../operation";

/** The simulator's request schemas live with the simulator, which lib does not import: the caller passes them. */
export function simulatorOperations(schemas: { startRun: z.ZodType; drillAction: z.ZodType }): Operation[] {
  return [
    {
      method: "get",
      path: "/api/simulator",
      tag: "Simulator",
      summary: "Simulated sites, their scenario, speed and clock",
      access: "admin",
      responses: { 200: "Simulated sites" },
    },
    {
      method: "post",
      path: "/api/simulator/{siteId}",
      tag: "Simulator",
      summary: "Start a scenario on a simulated site",
      access: "admin",
      body: schemas.startRun,
      responses: { 200: "The simulated site" },
    },
    {
      method: "delete",
      path: "/api/simulator/{siteId}",
      tag: "Simulator",
      summary: "Stop the site's scenario",
      access: "admin",
      responses: { 204: "Stopped" },
    },
    {
      method: "post",
      path: "/api/simulator/{siteId}/drill",
      tag: "Simulator",
      summary: "A drill action on a simulated plant (never a real controller)",
      access: "admin",
      body: schemas.drillAction,
      responses: { 202: "Sent to the simulated gateway" },
    },
  ];
}
