import { expect } from "vitest";
import { api, waitFor } from "./mqtt";
import type { TestServer } from "./server";

// A scripted trainee working the power-blip drill through the drill API, shared by the server and browser tests.

export type LiveEvent = { tsMs: number; kind: string; message: string };
export type Live = { running: boolean; simulatedMs: number; events: LiveEvent[] };

export const jsonPost = (body: unknown) => ({
  method: "POST",
  headers: { "content-type": "application/json" },
  body: JSON.stringify(body),
});

export function drillClient(server: TestServer, cookie: string) {
  const timings: number[] = [];
  const timed = async <T>(f: () => Promise<T>) => {
    const t0 = Date.now();
    const r = await f();
    timings.push(Date.now() - t0);
    return r;
  };
  const live = (drillId: string) =>
    timed(async () => (await api(server, cookie, `/api/drills/${drillId}`)).body as { drill: any; live: Live | null }); // eslint-disable-line @typescript-eslint/no-explicit-any -- checked field by field
  const cmd = (drillId: string, action: unknown) =>
    timed(() => api(server, cookie, `/api/drills/${drillId}/commands`, jsonPost(action)));

  async function ended(drillId: string) {
    return waitFor(
      async () => {
        const d = (await live(drillId)).drill;
        return d.state === "ended" ? d : null;
      },
      90_000,
      250,
    );
  }

  /**
   * The trainee who acts in time: at the first warning (the fan drive back from the blip in OFF), shed load,
   * fan to auto, timers to their minimums; if the chiller trips anyway, reset until it restarts before the
   * crossing; then put the timers and air handlers back. Returns which path the plant took.
   */
  async function actInTime(drillId: string): Promise<"restarted" | "no_trip"> {
    const warning = await waitFor(
      async () =>
        (await live(drillId)).live?.events.find((e) => /Fan drive restarted after power loss in OFF/.test(e.message)) ??
        null,
      60_000,
      20,
    );
    // Sent together, as one technician at the panel would in a minute: at 600× a wall second is 10 simulated minutes.
    const first = await Promise.all(
      [
        { type: "set-air-handler", equipment: "AHU-2", run: false },
        { type: "set-air-handler", equipment: "AHU-3", run: false },
        { type: "set-fan-drive-mode", equipment: "CT-1", mode: "auto" },
        { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "start-to-start", seconds: 120 },
        { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "stop-to-start", seconds: 60 },
      ].map((a) => cmd(drillId, a)),
    );
    for (const r of first) expect(r.status, JSON.stringify(r.body)).toBe(202);
    // If the head pressure trips the chiller before the fan catches up: reset (refused until the condenser
    // pressure is 10 psi under the cut-out, so retried) until it restarts; otherwise wait for the loop to settle.
    const path = await waitFor(
      async () => {
        const l = (await live(drillId)).live!;
        const trip = l.events.find((e) => e.kind === "alarm" && /High condenser pressure/.test(e.message));
        if (!trip) return l.simulatedMs - warning.tsMs >= 40 * 60_000 ? ("no_trip" as const) : null;
        if (l.events.some((e) => /Compressor started/.test(e.message) && e.tsMs > trip.tsMs))
          return "restarted" as const;
        await cmd(drillId, { type: "reset-alarm", equipment: "CH-1" });
        return null;
      },
      60_000,
      20,
    );
    const back = await Promise.all(
      [
        { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "start-to-start", seconds: 900 },
        { type: "set-anti-recycle-timer", equipment: "CH-1", timer: "stop-to-start", seconds: 180 },
        { type: "set-air-handler", equipment: "AHU-2", run: true },
        { type: "set-air-handler", equipment: "AHU-3", run: true },
      ].map((a) => cmd(drillId, a)),
    );
    for (const r of back) expect(r.status).toBe(202);
    return path;
  }

  return { live, cmd, ended, actInTime, timings };
}

/** A development server compiles a route on first use and then writes its cache, holding its event loop: do both before a 600× drill. */
export async function warmDrillRoutes(server: TestServer, cookie: string): Promise<void> {
  await api(server, cookie, "/api/drills/drill-none");
  await api(server, cookie, "/api/drills/drill-none/commands", jsonPost({ type: "reset-alarm", equipment: "CH-1" }));
  await api(server, cookie, "/api/drills/drill-none/stop", { method: "POST" });
  await api(server, cookie, "/api/drills", jsonPost({}));
  await api(server, cookie, "/api/training-sites");
  if (server.output().includes("Compiling"))
    await waitFor(async () => /Finished writing to filesystem cache/.test(server.output()), 60_000, 250).catch(
      () => {},
    );
}
