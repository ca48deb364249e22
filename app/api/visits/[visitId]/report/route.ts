import { requireApiViewer } from "@/app/(auth)/auth";
import { listVisitReports } from "@/db/queries/visit-reports";
import { getVisitSummary } from "@/db/queries/visits";
import { notFound } from "@/lib/errors";
import { readJson, route } from "@/lib/server/http";
import { getDb, getRuntime } from "@/lib/server/runtime";
import { sendVisitReport } from "@/lib/server/visit-report";
import { serviceContext } from "@/lib/server/visits";
import { sendVisitReportSchema } from "@/lib/schemas/service";

type Ctx = { params: Promise<{ visitId: string }> };

/** The times this visit's report was sent, newest first. */
export const GET = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const visitId = (await params).visitId;
  if (!getVisitSummary(getDb(), viewer, visitId)) throw notFound("No such visit.");
  return Response.json({ reports: listVisitReports(getDb(), viewer, { visitId }) });
});

export const POST = route<Ctx>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  await readJson(request, sendVisitReportSchema);
  const report = await sendVisitReport(serviceContext(), viewer, (await params).visitId, getRuntime()?.sendMail);
  return Response.json({ report }, { status: 201 });
});
