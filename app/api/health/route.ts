import { sql } from "drizzle-orm";
import { getDb, getRuntime, storageHealth } from "@/lib/server/runtime";

export const dynamic = "force-dynamic";

// No auth and no tenant data: load balancers and the on-call checklist call this. A database
// that can be read but not written is "degraded": a 503 too, since readings are not being kept.
export async function GET() {
  const db = (() => {
    try {
      return getDb().get<{ ok: number }>(sql`select 1 as ok`)?.ok === 1;
    } catch {
      return false;
    }
  })();
  const broker = getRuntime()?.status().broker ?? { mode: "none" as const, up: false, clients: 0 };
  const problem = storageHealth().problem();
  const status = !db || !broker.up ? "down" : problem ? "degraded" : "ok";
  return Response.json(
    {
      ok: status === "ok",
      status,
      db,
      broker: { mode: broker.mode, up: broker.up },
      ...(problem
        ? {
            storage: {
              status: "degraded",
              kind: problem.kind,
              reason: problem.reason,
              since: new Date(problem.sinceMs).toISOString(),
            },
          }
        : {}),
    },
    { status: status === "ok" ? 200 : 503 },
  );
}
