import "server-only";
import { and, desc, eq } from "drizzle-orm";
import type { Db } from "../client";
import { sites, users, visitReports, visits } from "../schema";
import { siteScope } from "./sites";
import type { Viewer } from "@/lib/auth/viewer";
import type { VisitReportDto } from "@/lib/dto/service";

// Customers' reports sent for visits: to whom and when. The PDF itself is rendered from the visit each
// time, so a row is the record of a sending. A customer matches only its own organization's sites.

export function reportWasSent(db: Pick<Db, "select">, visitId: string): boolean {
  return !!db.select({ id: visitReports.id }).from(visitReports).where(eq(visitReports.visitId, visitId)).get();
}

export function insertVisitReport(
  db: Pick<Db, "insert">,
  row: { visitId: string; sentAtMs: number; sentBy: string; recipients: string[] },
): number {
  return Number(
    db
      .insert(visitReports)
      .values({ visitId: row.visitId, sentAt: new Date(row.sentAtMs), sentBy: row.sentBy, recipients: row.recipients })
      .run().lastInsertRowid,
  );
}

/** Reports sent, newest first, for the sites the viewer may see. */
export function listVisitReports(
  db: Pick<Db, "select">,
  viewer: Viewer,
  filter: { siteId?: string; visitId?: string } = {},
): VisitReportDto[] {
  return db
    .select({
      id: visitReports.id,
      visitId: visitReports.visitId,
      siteId: visits.siteId,
      visitOpenedAt: visits.openedAt,
      visitClosedAt: visits.closedAt,
      sentAt: visitReports.sentAt,
      sentBy: users.name,
      recipients: visitReports.recipients,
    })
    .from(visitReports)
    .innerJoin(visits, eq(visits.id, visitReports.visitId))
    .innerJoin(sites, eq(sites.id, visits.siteId))
    .innerJoin(users, eq(users.id, visitReports.sentBy))
    .where(
      and(
        siteScope(viewer),
        filter.siteId ? eq(visits.siteId, filter.siteId) : undefined,
        filter.visitId ? eq(visitReports.visitId, filter.visitId) : undefined,
      ),
    )
    .orderBy(desc(visitReports.sentAt), desc(visitReports.id))
    .all()
    .map((r) => ({
      ...r,
      visitOpenedAt: r.visitOpenedAt.getTime(),
      visitClosedAt: r.visitClosedAt?.getTime() ?? null,
      sentAt: r.sentAt.getTime(),
    }));
}
