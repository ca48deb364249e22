import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/db/client";
import { rotateGatewayPassword } from "@/db/queries/gateways";
import { notifyGatewayChanged } from "@/gateway/link";
import { route } from "@/lib/server/http";
import { gatewayParams } from "@/lib/schemas/gateways";

export const dynamic = "force-dynamic";

/** A new password (shown once); the old one stops working and live connections are closed. */
export const POST = route<{ params: Promise<{ gatewayId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { gatewayId } = gatewayParams.parse(await params);
  const rotated = await rotateGatewayPassword(getDb(), viewer, gatewayId);
  notifyGatewayChanged(gatewayId, "credentials");
  return Response.json(rotated, { headers: { "cache-control": "no-store" } });
});
