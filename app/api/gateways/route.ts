import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { listGateways } from "@/db/queries/gateways";
import { provisionGateway } from "@/lib/server/gateways";
import { readJson, route } from "@/lib/server/http";
import { createGatewaySchema, listGatewaysQuery } from "@/lib/schemas/gateways";

export const dynamic = "force-dynamic";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const { site } = listGatewaysQuery.parse(Object.fromEntries(new URL(request.url).searchParams));
  return Response.json({ gateways: listGateways(getDb(), viewer, site) });
});

/** 201 with the gateway and its MQTT credentials; the password is never shown again. */
export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const body = await readJson(request, createGatewaySchema);
  const created = await provisionGateway(getDb(), viewer, body);
  return Response.json(created, { status: 201, headers: { "cache-control": "no-store" } });
});
