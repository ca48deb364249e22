import { z } from "zod";
import { requireApiViewer } from "@/app/(auth)/auth";
import { listEquipment } from "@/db/queries/equipment";
import { readJson, route } from "@/lib/server/http";
import { createEquipment } from "@/lib/server/plant-records";
import { getDb } from "@/lib/server/runtime";
import { includeRetiredQuery } from "@/lib/schemas/customers";

type Ctx = { params: Promise<{ siteId: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  const { includeRetired } = includeRetiredQuery.parse(Object.fromEntries(new URL(request.url).searchParams));
  return Response.json({ equipment: listEquipment(getDb(), viewer, siteId, { includeRetired }) });
});

/** Adds equipment; the body is one kind's record (lib/schemas/equipment.ts), validated after the site check. */
export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { siteId } = await params;
  const body = await readJson(request, z.unknown());
  return Response.json({ equipment: createEquipment(getDb(), viewer, siteId, body) }, { status: 201 });
});
