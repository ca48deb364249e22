import { requireApiViewer } from "@/app/(auth)/auth";
import { listServiceRequests } from "@/db/queries/service-requests";
import { readJson, route } from "@/lib/server/http";
import { getDb, getRuntime } from "@/lib/server/runtime";
import { requestService } from "@/lib/server/service-requests";
import { serviceContext } from "@/lib/server/visits";
import { createServiceRequestSchema, serviceRequestQuerySchema } from "@/lib/schemas/service";

export const GET = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const q = serviceRequestQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
  return Response.json({ requests: listServiceRequests(getDb(), viewer, { siteId: q.site, open: q.open === "1" }) });
});

export const POST = route(async (request) => {
  const viewer = await requireApiViewer(request);
  const input = await readJson(request, createServiceRequestSchema);
  const runtime = getRuntime();
  const created = await requestService(serviceContext(), viewer, input, {
    sendMail: runtime?.sendMail,
    publicUrl: process.env.NEXTAUTH_URL ?? new URL(request.url).origin,
    log: (line) => console.log(line),
  });
  return Response.json({ request: created }, { status: 201 });
});
