import { requireApiViewer } from "@/app/(auth)/auth";
import { route } from "@/lib/server/http";
import { buildIncidentPdf } from "@/lib/server/incident-report";
import { getDb } from "@/lib/server/runtime";

// The review and the customer's version as a PDF (a customer gets their version only, once shared).
export const GET = route<{ params: Promise<{ incidentId: string }> }>(async (request, { params }) => {
  const viewer = await requireApiViewer(request);
  const { pdf, review } = await buildIncidentPdf(getDb(), viewer, (await params).incidentId);
  const day = new Date(review.incident.startedAtMs).toISOString().slice(0, 10);
  return new Response(new Uint8Array(pdf), {
    headers: {
      "content-type": "application/pdf",
      "content-length": String(pdf.byteLength),
      "content-disposition": `inline; filename="incident-${day}.pdf"`,
      "x-content-type-options": "nosniff",
      "cache-control": "private, no-store",
    },
  });
});
