import { sql } from "drizzle-orm";
import { getDb } from "@/lib/server/runtime";
import { getRuntime } from "@/lib/server/runtime";

export const dynamic = "force-dynamic";

// No auth and no tenant data: load balancers and the on-call checklist call this.
export async function GET() {
  const db = (() => {
    try {
      return getDb().get<{ ok: number }>(sql`select 1 as ok`)?.ok === 1;
    } catch {
      return false;
    }
  })();
  const broker = getRuntime()?.status().broker ?? { mode: "none" as const, up: false, clients: 0 };
  const ok = db && broker.up;
  return Response.json({ ok, db, broker: { mode: broker.mode, up: broker.up } }, { status: ok ? 200 : 503 });
}
