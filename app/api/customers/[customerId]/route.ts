import { requireApiViewer } from "@/app/(auth)/auth";
import { getCustomer } from "@/db/queries/customers";
import { notFound } from "@/lib/errors";
import { readJson, route } from "@/lib/server/http";
import { editCustomer, retireCustomer } from "@/lib/server/plant-records";
import { getDb } from "@/lib/server/runtime";
import { customerPatchSchema } from "@/lib/schemas/customers";

type Ctx = { params: Promise<{ customerId: string }> };

export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const customer = getCustomer(getDb(), viewer, (await params).customerId);
  if (!customer) throw notFound("No such customer.");
  return Response.json({ customer });
});

export const PATCH = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { customerId } = await params;
  const body = await readJson(request, customerPatchSchema);
  return Response.json({ customer: editCustomer(getDb(), viewer, customerId, body) });
});

/** Retires the customer and its sites (kept with their history). */
export const DELETE = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  return Response.json(retireCustomer(getDb(), viewer, (await params).customerId));
});
