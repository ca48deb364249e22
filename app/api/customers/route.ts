import { requireApiViewer } from "@/app/(auth)/auth";
import { listCustomers } from "@/db/queries/customers";
import { readJson, route } from "@/lib/server/http";
import { createCustomer } from "@/lib/server/plant-records";
import { getDb } from "@/lib/server/runtime";
import { customerSchema, includeRetiredQuery } from "@/lib/schemas/customers";

export const dynamic = "force-dynamic";

/** Customers the viewer may see; `?includeRetired=1` adds retired ones for admins. */
export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const { includeRetired } = includeRetiredQuery.parse(Object.fromEntries(new URL(request.url).searchParams));
  return Response.json({ customers: listCustomers(getDb(), viewer, { includeRetired }) });
});

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const body = await readJson(request, customerSchema);
  return Response.json({ customer: createCustomer(getDb(), viewer, body) }, { status: 201 });
});
