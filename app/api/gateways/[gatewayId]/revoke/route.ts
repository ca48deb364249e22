import { requireApiViewer } from "@/app/(auth)/auth";
import { getDb } from "@/lib/server/runtime";
import { retireGateway } from "@/lib/server/gateways";
import { route } from "@/lib/server/http";
import { gatewayParams } from "@/lib/schemas/gateways";

export const dynamic = "force-dynamic";

/** Revokes the credentials for good and drops the gateway's live connection. */
export const POST = route<{ params: Promise<{ gatewayId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { gatewayId } = gatewayParams.parse(await params);
  const gateway = retireGateway(getDb(), viewer, gatewayId);
  return Response.json({ gateway });
});
