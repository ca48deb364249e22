import PDFDocument from "pdfkit";
import type { Db } from "@/db/client";
import { seesAllSites, type Viewer } from "@/lib/auth/viewer";
import type { IncidentReviewDto } from "@/lib/dto/incidents";
import { parseCustomerSummary } from "@/lib/incidents/customer-summary";
import { formatDuration } from "@/lib/units";
import { buildIncidentReview } from "./incidents";

// An incident as a PDF, drawn with pdfkit's built-in Helvetica like the visit report: the team's
// review (key figures, cause, lesson, timeline) and the customer's version for staff; a customer gets
// only their version, once shared.

function siteTime(ms: number, timeZone: string): string {
  return new Intl.DateTimeFormat("en-US", {
    timeZone,
    dateStyle: "medium",
    timeStyle: "medium",
  }).format(new Date(ms));
}

export async function buildIncidentPdf(db: Db, viewer: Viewer, incidentId: string) {
  const review = buildIncidentReview(db, viewer, incidentId);
  return { review, pdf: await drawPdf(review, seesAllSites(viewer)) };
}

function drawPdf(review: IncidentReviewDto, staff: boolean): Promise<Buffer> {
  const { incident: inc, keyFigures: f } = review;
  const tz = inc.siteTimeZone;
  const doc = new PDFDocument({ size: "A4", margin: 50, info: { Title: inc.title, Author: "Liftline" } });
  const chunks: Buffer[] = [];
  doc.on("data", (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on("end", () => resolve(Buffer.concat(chunks)));
    doc.on("error", reject);
  });
  const heading = (text: string) => doc.moveDown(0.8).font("Helvetica-Bold").fontSize(13).text(text).moveDown(0.3);
  const body = (text: string) => doc.font("Helvetica").fontSize(10).text(text);
  doc.font("Helvetica-Bold").fontSize(18).text(inc.title);
  body(`${inc.siteName} · times in ${tz}`);
  body(
    `From ${siteTime(inc.startedAtMs, tz)}${inc.endedAtMs ? ` to ${siteTime(inc.endedAtMs, tz)}` : " (still lasting)"}`,
  );
  const parts = parseCustomerSummary(inc.customerSummary);
  heading(staff ? "Customer's version" : "What happened, and what was done");
  if (!inc.customerSummary.trim()) body("Not written yet.");
  else
    for (const [title, text] of [
      ["What happened", parts.happened],
      ["What was done", parts.done],
      ["What we recommend", parts.recommended],
    ] as const) {
      doc.font("Helvetica-Bold").fontSize(11).text(title);
      body(text || "—");
      doc.moveDown(0.3);
    }
  if (staff) {
    heading("Key figures");
    const figure = (label: string, v: string | null) => body(`${label}: ${v ?? "—"}`);
    figure(
      "Warning lead",
      f.warningLeadS !== null
        ? `${formatDuration(f.warningLeadS)} (${f.firstWarning?.ruleId} to ${f.leadEnd?.kind})`
        : null,
    );
    figure("Time to acknowledge", f.timeToAcknowledgeS !== null ? formatDuration(f.timeToAcknowledgeS) : null);
    figure("Time to first action", f.timeToFirstActionS !== null ? formatDuration(f.timeToFirstActionS) : null);
    figure("Time to recovery", f.timeToRecoveryS !== null ? formatDuration(f.timeToRecoveryS) : null);
    figure("Lowest margin", f.lowestMargin ? `${f.lowestMargin.valueK.toFixed(1)} K` : null);
    figure("Highest drive temperature", f.highestDriveTemp ? `${f.highestDriveTemp.valueC.toFixed(1)} °C` : null);
    heading("Cause");
    body(inc.cause || "Not written yet.");
    heading("Lesson");
    body(inc.lesson || "Not written yet.");
    heading("Timeline");
    for (const e of review.timeline)
      body(
        `${siteTime(e.atMs, tz)}  ${e.equipment ?? ""}  ${e.text}${e.who ? ` (${e.who})` : ""}`.replace(/\s+/g, " "),
      );
  }
  doc.end();
  return done;
}
