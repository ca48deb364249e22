import { requireApiViewer } from "@/app/(auth)/auth";
import { listSavedScenarios } from "@/db/queries/drills";
import { saveScenarioSchema } from "@/lib/schemas/drills";
import { requireDrills } from "@/lib/server/drill-access";
import { readJson, route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

// Drill starting points saved from a site's stored readings at a moment (a real incident's conditions).
export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  return Response.json({ scenarios: listSavedScenarios(getDb(), viewer) });
});

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, saveScenarioSchema);
  return Response.json({ scenario: requireDrills().saveScenario(viewer, input) }, { status: 201 });
});
