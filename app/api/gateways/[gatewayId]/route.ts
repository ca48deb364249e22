import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { getGateway } from "@/db/queries/gateways";
import { notFound } from "@/lib/errors";
import { retireGateway } from "@/lib/server/gateways";
import { route } from "@/lib/server/http";
import { gatewayParams } from "@/lib/schemas/gateways";

export const dynamic = "force-dynamic";
type Ctx = { params: Promise<{ gatewayId: string }> };

/** Status and counters: connected, last message, messages, readings, rejections, unmapped names. */
export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { gatewayId } = gatewayParams.parse(await params);
  const gateway = getGateway(getDb(), viewer, gatewayId);
  if (!gateway) throw notFound("No such gateway.");
  return Response.json({ gateway });
});

/** Same as POST …/revoke. */
export const DELETE = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { gatewayId } = gatewayParams.parse(await params);
  const gateway = retireGateway(getDb(), viewer, gatewayId);
  return Response.json({ gateway });
});
