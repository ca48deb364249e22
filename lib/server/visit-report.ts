import PDFDocument from "pdfkit";
import sharp from "sharp";
import { writeAudit } from "@/db/queries/audit";
import { listEquipment } from "@/db/queries/equipment";
import { getStoredFile, listSiteFiles } from "@/db/queries/files";
import { listEquipmentPoints } from "@/db/queries/points";
import { getSeries } from "@/db/queries/readings";
import { getSite } from "@/db/queries/sites";
import { insertVisitReport, listVisitReports } from "@/db/queries/visit-reports";
import { getVisitForReport, getVisitSummary } from "@/db/queries/visits";
import { canAct, type Viewer } from "@/lib/auth/viewer";
import type { VisitDto, VisitReportDto } from "@/lib/dto/service";
import { AppError, notFound } from "@/lib/errors";
import { quantities } from "@/lib/quantities";
import { visitReportModel, type VisitReportModel } from "@/lib/service/report";
import { reportTrendSvg, type TrendLine } from "@/lib/service/report-trend";
import { loadConfig } from "./config";
import { fileStorage, type FileStorage } from "./file-storage";
import type { MailMessage } from "./mail";
import type { ServiceContext } from "./visits";

// The customer's report of a visit: a PDF drawn with pdfkit's built-in Helvetica (no font files to
// ship or download) and an HTML e-mail with the PDF attached, both from one model (lib/service/report.ts).

export interface VisitReport {
  visit: VisitDto;
  model: VisitReportModel;
  pdf: Buffer;
  /** The key temperatures during the visit as a PNG, or null without readings. */
  trendPng: Buffer | null;
}

const TREND_QUANTITIES = ["chilled_water_leaving_temp", "condenser_water_entering_temp"] as const;
export const TREND_CAPTION = "Chilled water leaving and condenser water entering each chiller during the visit";

/** The two loop temperatures a customer can follow, per chiller, from 30 min before the visit to its end. */
async function keyTemperatureTrend(ctx: ServiceContext, viewer: Viewer, visit: VisitDto): Promise<Buffer | null> {
  // Only the chillers' point ids are needed: their records, not the site's latest values.
  const pts = listEquipment(ctx.db, viewer, visit.siteId)
    .filter((e) => e.kind === "chiller")
    .slice(0, 2)
    .flatMap((e) =>
      listEquipmentPoints(ctx.db, viewer, e.id)
        .filter((p) => (TREND_QUANTITIES as readonly string[]).includes(p.quantity))
        .map((p) => ({ pointId: p.id, tag: e.tag, quantity: p.quantity })),
    );
  if (pts.length === 0) return null;
  const fromMs = visit.openedAt - 30 * 60_000;
  const toMs = Math.min(ctx.nowMs, (visit.closedAt ?? ctx.nowMs) + 10 * 60_000);
  const rawRetentionMs = loadConfig().RAW_RETENTION_DAYS * 86_400_000;
  const series = pts.map((p) => ({
    p,
    s: getSeries(ctx.db, viewer, p.pointId, { fromMs, toMs, maxPoints: 240 }, { nowMs: ctx.nowMs, rawRetentionMs }),
  }));
  const lines: TrendLine[] = series.map(({ p, s }) => ({
    label: `${p.tag} ${quantities[p.quantity as (typeof TREND_QUANTITIES)[number]].label.toLowerCase()}`,
    time: s.time,
    value: s.avg,
  }));
  const svg = reportTrendSvg(lines, {
    fromMs,
    toMs,
    unit: series[0].s.unit,
    timeZone: visit.siteTimeZone,
    marks: [
      { atMs: visit.openedAt, label: "visit opened" },
      ...(visit.closedAt !== null ? [{ atMs: visit.closedAt, label: "closed" }] : []),
    ],
  });
  // Flattened: a PNG with an alpha channel becomes two image objects in the PDF (the picture and its mask).
  return svg ? sharp(Buffer.from(svg)).flatten({ background: "#ffffff" }).png().toBuffer() : null;
}

/** Shared photos' thumbnails as JPEG, since the PDF takes JPEG and PNG and thumbnails are stored as WebP. */
async function photoImages(
  ctx: ServiceContext,
  viewer: Viewer,
  visit: VisitDto,
  storage: FileStorage,
): Promise<Array<{ caption: string; originalName: string; fileId: string; jpeg: Buffer | null }>> {
  const shared = listSiteFiles(ctx.db, viewer, visit.siteId, { visitId: visit.id }).filter(
    (f) => f.sharedWithCustomer && f.mediaType.startsWith("image/"),
  );
  return Promise.all(
    shared.map(async (f) => {
      const key = getStoredFile(ctx.db, viewer, f.id)?.thumbnailKey;
      const bytes = key ? await storage.get(key) : null;
      // A photo that cannot be drawn is still listed by name, so the report never silently drops one.
      const jpeg = bytes
        ? await sharp(bytes)
            .jpeg({ quality: 80 })
            .toBuffer()
            .catch(() => null)
        : null;
      return { fileId: f.id, caption: f.caption, originalName: f.originalName, jpeg };
    }),
  );
}

function drawPdf(
  model: VisitReportModel,
  images: Array<{ caption: string; jpeg: Buffer | null }>,
  trendPng: Buffer | null,
): Promise<Buffer> {
  const doc = new PDFDocument({ size: "A4", margin: 50, info: { Title: model.title, Author: "Liftline" } });
  const chunks: Buffer[] = [];
  doc.on("data", (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on("end", () => resolve(Buffer.concat(chunks)));
    doc.on("error", reject);
  });
  const heading = (text: string) => doc.moveDown(0.8).font("Helvetica-Bold").fontSize(13).text(text).moveDown(0.3);
  const list = (items: string[], empty: string) => {
    doc.font("Helvetica").fontSize(10.5);
    if (items.length === 0) doc.fillColor("#555").text(empty).fillColor("black");
    for (const item of items) doc.text(item, { paragraphGap: 3 });
  };
  doc.font("Helvetica-Bold").fontSize(18).text(model.title);
  doc.moveDown(0.4).font("Helvetica").fontSize(10.5);
  doc.text(`Site: ${model.siteName}${model.siteAddress ? `, ${model.siteAddress}` : ""}`);
  doc.text(`When: ${model.when}`);
  doc.text(`Technician: ${model.technician} (${model.how.toLowerCase()})`);
  heading("What we found");
  list(model.findings, "No findings were recorded.");
  heading("What we did");
  list(model.done, "No work was recorded.");
  heading("Temporary changes");
  list(model.changes, "No temporary changes were made.");
  if (model.closing) list([model.closing], "");
  heading("The plant's key numbers, before and after");
  list(model.keyNumbers, "No readings were on record when the visit began or ended.");
  if (trendPng) {
    heading("Key temperatures during the visit");
    if (doc.y > doc.page.height - 300) doc.addPage();
    doc.image(trendPng, { fit: [480, 180] }).moveDown(0.2);
    doc.font("Helvetica").fontSize(9).fillColor("#555").text(TREND_CAPTION).fillColor("black");
  }
  heading("Photos");
  if (images.length === 0) list([], "No photos were shared.");
  for (const image of images) {
    doc.font("Helvetica").fontSize(10.5);
    if (image.jpeg) {
      if (doc.y > doc.page.height - 260) doc.addPage();
      doc.image(image.jpeg, { fit: [240, 180] }).moveDown(0.2);
    }
    doc.text(image.caption || "Photo", { paragraphGap: 8 });
  }
  doc.end();
  return done;
}

/** The report as the viewer may read it: staff any time (a preview), a customer of the site once one was sent. */
export async function buildVisitReport(
  ctx: ServiceContext,
  viewer: Viewer,
  visitId: string,
  storage: FileStorage = fileStorage(),
): Promise<VisitReport> {
  const visit = getVisitForReport(ctx.db, viewer, visitId, ctx);
  if (!visit) throw notFound("No such visit report.");
  const site = getSite(ctx.db, viewer, visit.siteId, { includeRetired: true });
  if (!site) throw notFound("No such visit report.");
  const images = await photoImages(ctx, viewer, visit, storage);
  const model = visitReportModel(
    visit,
    { name: site.name, address: site.address },
    images.map(({ fileId, caption, originalName }) => ({ fileId, caption, originalName })),
  );
  const trendPng = await keyTemperatureTrend(ctx, viewer, visit);
  return { visit, model, pdf: await drawPdf(model, images, trendPng), trendPng };
}

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

export function reportMail(model: VisitReportModel, withTrend = false): { text: string; html: string } {
  const sections: Array<[string, string[], string]> = [
    ["What we found", model.findings, "No findings were recorded."],
    ["What we did", model.done, "No work was recorded."],
    [
      "Temporary changes",
      [...model.changes, ...(model.closing ? [model.closing] : [])],
      "No temporary changes were made.",
    ],
    ["The plant's key numbers, before and after", model.keyNumbers, "No readings were on record."],
  ];
  const header = [
    `Site: ${model.siteName}`,
    `When: ${model.when}`,
    `Technician: ${model.technician} (${model.how.toLowerCase()})`,
  ];
  const text = [
    model.title,
    "",
    ...header,
    ...sections.flatMap(([title, items, empty]) => [
      "",
      title,
      ...(items.length ? items.map((i) => `- ${i}`) : [empty]),
    ]),
    "",
    "The full report, with photos, is attached as a PDF.",
  ].join("\n");
  const html = [
    `<h1 style="font-family:sans-serif;font-size:20px">${escapeHtml(model.title)}</h1>`,
    `<p style="font-family:sans-serif">${header.map(escapeHtml).join("<br>")}</p>`,
    ...sections.map(
      ([title, items, empty]) =>
        `<h2 style="font-family:sans-serif;font-size:16px">${escapeHtml(title)}</h2>` +
        (items.length
          ? `<ul style="font-family:sans-serif">${items.map((i) => `<li>${escapeHtml(i)}</li>`).join("")}</ul>`
          : `<p style="font-family:sans-serif;color:#555">${escapeHtml(empty)}</p>`),
    ),
    ...(withTrend
      ? [
          `<h2 style="font-family:sans-serif;font-size:16px">Key temperatures during the visit</h2>`,
          `<img src="cid:key-temperatures" alt="${escapeHtml(TREND_CAPTION)}" width="640" style="max-width:100%;height:auto">`,
        ]
      : []),
    `<p style="font-family:sans-serif">The full report, with photos, is attached as a PDF.</p>`,
  ].join("\n");
  return { text, html };
}

/**
 * E-mails the report of a closed visit to the site's contacts that have an e-mail address and records
 * the sending with its audit entry. Sending again is allowed (each sending is its own record).
 */
export async function sendVisitReport(
  ctx: ServiceContext,
  viewer: Viewer,
  visitId: string,
  sendMail: ((message: MailMessage) => Promise<void>) | undefined,
  storage: FileStorage = fileStorage(),
): Promise<VisitReportDto> {
  if (!getVisitSummary(ctx.db, viewer, visitId)) throw notFound("No such visit.");
  if (!canAct(viewer)) throw new AppError("forbidden", "Only the service company's staff can send a report.");
  const report = await buildVisitReport(ctx, viewer, visitId, storage);
  if (report.visit.closedAt === null)
    throw new AppError("conflict", "Close the visit before sending its report; the preview is available meanwhile.");
  const site = getSite(ctx.db, viewer, report.visit.siteId, { includeRetired: true })!;
  const recipients = [...new Set(site.contacts.map((c) => c.email.trim()).filter((e) => e.length > 0))];
  if (recipients.length === 0)
    throw new AppError("conflict", "The site has no contact with an e-mail address. Add one on the site's page.");
  if (!sendMail) throw new AppError("unavailable", "Mail is not running in this process.");
  const { text, html } = reportMail(report.model, report.trendPng !== null);
  const day = new Date(report.visit.closedAt).toISOString().slice(0, 10);
  await sendMail({
    to: recipients.join(", "),
    subject: `Liftline: service visit report for ${site.name}`,
    text,
    html,
    attachments: [
      { filename: `visit-report-${day}.pdf`, content: report.pdf, contentType: "application/pdf" },
      ...(report.trendPng
        ? [
            {
              filename: "key-temperatures.png",
              content: report.trendPng,
              contentType: "image/png",
              cid: "key-temperatures",
            },
          ]
        : []),
    ],
  });
  const id = ctx.db.transaction(
    (tx) => {
      const reportId = insertVisitReport(tx, { visitId, sentAtMs: ctx.nowMs, sentBy: viewer.userId, recipients });
      writeAudit(
        tx,
        viewer,
        {
          action: "send_report",
          entityType: "visit",
          entityId: visitId,
          siteId: report.visit.siteId,
          summary: `Visit report sent to ${recipients.join(", ")}`,
          before: null,
          after: { recipients },
        },
        ctx.nowMs,
      );
      return reportId;
    },
    { behavior: "immediate" },
  );
  return listVisitReports(ctx.db, viewer, { visitId }).find((r) => r.id === id)!;
}
