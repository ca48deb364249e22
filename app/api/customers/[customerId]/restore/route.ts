import { requireApiViewer } from "@/app/(auth)/auth";
import { route } from "@/lib/server/http";
import { restoreCustomer } from "@/lib/server/plant-records";
import { getDb } from "@/lib/server/runtime";

type Ctx = { params: Promise<{ customerId: string }> };

/** Restores a retired customer and the sites retired with it. */
export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  return Response.json(restoreCustomer(getDb(), viewer, (await params).customerId));
});
