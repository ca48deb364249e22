import { requireApiViewer } from "@/app/(auth)/auth";
import { getPreferences, savePreferences } from "@/db/queries/notify";
import { preferencesSchema } from "@/lib/schemas/notify";
import { readJson, route } from "@/lib/server/http";
import { getDb } from "@/lib/server/runtime";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  return Response.json({ preferences: getPreferences(getDb(), viewer) });
});

export const PUT = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, preferencesSchema);
  return Response.json({ preferences: savePreferences(getDb(), viewer, input) });
});
