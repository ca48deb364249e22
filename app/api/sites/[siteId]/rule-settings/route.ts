import { z } from "zod";
import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { getRuleOverrides } from "@/db/queries/alarms";
import { canSeeSite } from "@/db/queries/sites";
import { notFound } from "@/lib/errors";
import { readJson, route } from "@/lib/server/http";
import { requireAdmin, requireStaff } from "@/lib/server/guards";
import { saveRuleSettings } from "@/lib/server/rule-settings";
import { defaultRuleSettings, parseRuleSettings } from "@/lib/rules/settings";

type Ctx = { params: Promise<{ siteId: string }> };

async function visibleSite(request: Request, params: Ctx["params"]) {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  if (!canSeeSite(getDb(), viewer, siteId)) throw notFound("No such site.");
  return { viewer, siteId };
}

/** The site's stored overrides, the effective settings and the documented defaults (staff). */
export const GET = route<Ctx>(async (request, { params }) => {
  const { viewer, siteId } = await visibleSite(request, params);
  requireStaff(viewer);
  const overrides = getRuleOverrides(getDb(), siteId);
  return Response.json({ overrides, effective: parseRuleSettings(overrides), defaults: defaultRuleSettings });
});

/** Replaces the overrides (admins); every field is validated, unknown keys are refused. */
export const PUT = route<Ctx>(async (request, { params }) => {
  const { viewer, siteId } = await visibleSite(request, params);
  requireAdmin(viewer);
  const overrides = await readJson(request, z.record(z.string(), z.unknown()));
  return Response.json(saveRuleSettings(getDb(), viewer, siteId, overrides));
});
