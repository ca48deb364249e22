import { requireApiViewer } from "@/app/(auth)/auth";
import { route } from "@/lib/server/http";
import { buildVisitReport } from "@/lib/server/visit-report";
import { serviceContext } from "@/lib/server/visits";

// The customer's report as a PDF: a preview for staff, the sent report for the site's customer.
export const GET = route<{ params: Promise<{ visitId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { pdf, visit } = await buildVisitReport(serviceContext(), viewer, (await params).visitId);
  const day = new Date(visit.closedAt ?? visit.openedAt).toISOString().slice(0, 10);
  return new Response(new Uint8Array(pdf), {
    headers: {
      "content-type": "application/pdf",
      "content-length": String(pdf.byteLength),
      "content-disposition": `inline; filename="visit-report-${day}.pdf"`,
      "x-content-type-options": "nosniff",
      // Rendered from the visit each time: a later log entry or put-back must show at once.
      "cache-control": "private, no-store",
    },
  });
});
