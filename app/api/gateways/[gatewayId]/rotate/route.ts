import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { rotateGatewayCredentials } from "@/lib/server/gateways";
import { route } from "@/lib/server/http";
import { gatewayParams } from "@/lib/schemas/gateways";

export const dynamic = "force-dynamic";

/** A new password (shown once); the old one stops working and live connections are closed. */
export const POST = route<{ params: Promise<{ gatewayId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { gatewayId } = gatewayParams.parse(await params);
  const rotated = await rotateGatewayCredentials(getDb(), viewer, gatewayId);
  return Response.json(rotated, { headers: { "cache-control": "no-store" } });
});
