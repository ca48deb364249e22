import "server-only";
import { and, asc, eq, type SQL } from "drizzle-orm";
import type { Db } from "../client";
import { serviceRequests, sites, storedFiles, users, visits } from "../schema";
import { writeAudit } from "./audit";
import { seesAllSites, type Viewer } from "@/lib/auth/viewer";
import { notFound } from "@/lib/errors";
import type { StoredFileDto } from "@/lib/dto/files";
import type { FileUpdateInput } from "@/lib/schemas/files";

// Uploaded photos and PDFs. Authorization lives here: staff see every file; a customer's viewer
// matches only files of its own organization's sites that were shared with it, so anything else
// answers exactly like a file that does not exist.

function fileScope(viewer: Viewer): SQL | undefined {
  if (seesAllSites(viewer)) return undefined;
  return and(
    eq(sites.organizationId, viewer.organizationId),
    eq(sites.training, false),
    eq(storedFiles.sharedWithCustomer, true),
  );
}

const columns = {
  id: storedFiles.id,
  siteId: storedFiles.siteId,
  visitId: storedFiles.visitId,
  serviceRequestId: storedFiles.serviceRequestId,
  mediaType: storedFiles.mediaType,
  bytes: storedFiles.bytes,
  originalName: storedFiles.originalName,
  caption: storedFiles.caption,
  sharedWithCustomer: storedFiles.sharedWithCustomer,
  uploaderId: storedFiles.uploadedBy,
  uploaderName: users.name,
  createdAt: storedFiles.createdAt,
  storageKey: storedFiles.storageKey,
  thumbnailKey: storedFiles.thumbnailKey,
};

type Row = {
  id: string;
  siteId: string;
  visitId: string | null;
  serviceRequestId: string | null;
  mediaType: string;
  bytes: number;
  originalName: string;
  caption: string;
  sharedWithCustomer: boolean;
  uploaderId: string;
  uploaderName: string;
  createdAt: Date;
  storageKey: string;
  thumbnailKey: string | null;
};

function toDto(r: Row): StoredFileDto {
  return {
    id: r.id,
    siteId: r.siteId,
    visitId: r.visitId,
    serviceRequestId: r.serviceRequestId,
    mediaType: r.mediaType,
    bytes: r.bytes,
    originalName: r.originalName,
    caption: r.caption,
    sharedWithCustomer: r.sharedWithCustomer,
    uploadedBy: { id: r.uploaderId, name: r.uploaderName },
    createdAt: r.createdAt.getTime(),
    url: `/api/files/${encodeURIComponent(r.id)}`,
    thumbnailUrl: r.thumbnailKey ? `/api/files/${encodeURIComponent(r.id)}/thumbnail` : null,
  };
}

function selectFiles(db: Db) {
  return db
    .select(columns)
    .from(storedFiles)
    .innerJoin(sites, eq(sites.id, storedFiles.siteId))
    .innerJoin(users, eq(users.id, storedFiles.uploadedBy));
}

/** A file with its storage keys (for the route that serves the bytes), or null when not the viewer's to see. */
export function getStoredFile(
  db: Db,
  viewer: Viewer,
  fileId: string,
): (StoredFileDto & { storageKey: string; thumbnailKey: string | null }) | null {
  const row = selectFiles(db)
    .where(and(eq(storedFiles.id, fileId), fileScope(viewer)))
    .get();
  return row ? { ...toDto(row), storageKey: row.storageKey, thumbnailKey: row.thumbnailKey } : null;
}

export function getFileDto(db: Db, viewer: Viewer, fileId: string): StoredFileDto | null {
  const row = selectFiles(db)
    .where(and(eq(storedFiles.id, fileId), fileScope(viewer)))
    .get();
  return row ? toDto(row) : null;
}

/** A site's files, oldest first; a customer sees only the shared ones of its own sites. */
export function listSiteFiles(
  db: Db,
  viewer: Viewer,
  siteId: string,
  filter: { visitId?: string; serviceRequestId?: string } = {},
): StoredFileDto[] {
  return selectFiles(db)
    .where(
      and(
        eq(storedFiles.siteId, siteId),
        fileScope(viewer),
        filter.visitId ? eq(storedFiles.visitId, filter.visitId) : undefined,
        filter.serviceRequestId ? eq(storedFiles.serviceRequestId, filter.serviceRequestId) : undefined,
      ),
    )
    .orderBy(asc(storedFiles.createdAt), asc(storedFiles.id))
    .all()
    .map(toDto);
}

/**
 * Checks that the visit and service request an upload names belong to the site. The site itself
 * must already be one the viewer may see (canSeeSite); a customer may upload only with a service
 * request of that site, since customers add photos to their own requests and nowhere else.
 */
export function checkUploadLinks(
  db: Db,
  viewer: Viewer,
  siteId: string,
  links: { visitId?: string; serviceRequestId?: string },
): void {
  if (links.visitId) {
    if (!seesAllSites(viewer)) throw notFound("No such visit on this site.");
    const visit = db
      .select({ id: visits.id })
      .from(visits)
      .where(and(eq(visits.id, links.visitId), eq(visits.siteId, siteId)))
      .get();
    if (!visit) throw notFound("No such visit on this site.");
  }
  if (links.serviceRequestId) {
    const request = db
      .select({ id: serviceRequests.id })
      .from(serviceRequests)
      .where(and(eq(serviceRequests.id, links.serviceRequestId), eq(serviceRequests.siteId, siteId)))
      .get();
    if (!request) throw notFound("No such service request on this site.");
  } else if (!seesAllSites(viewer)) {
    throw notFound("Photos can be added to your own service requests; name one.");
  }
}

export interface NewStoredFile {
  id: string;
  siteId: string;
  visitId: string | null;
  serviceRequestId: string | null;
  mediaType: string;
  bytes: number;
  storageKey: string;
  thumbnailKey: string | null;
  originalName: string;
  caption: string;
  sharedWithCustomer: boolean;
}

/** Records an upload whose bytes are already stored; returns it as its uploader sees it. */
export function insertStoredFile(db: Db, viewer: Viewer, file: NewStoredFile): StoredFileDto {
  db.insert(storedFiles)
    .values({ ...file, uploadedBy: viewer.userId })
    .run();
  const row = selectFiles(db).where(eq(storedFiles.id, file.id)).get();
  if (!row) throw new Error("stored file vanished after insert");
  return toDto(row);
}

/**
 * Staff change a file's caption or whether the customer sees it. Sharing hands a photo of a
 * plant room to another organization, so each change is audited with before and after.
 */
export function updateStoredFile(db: Db, viewer: Viewer, fileId: string, patch: FileUpdateInput): StoredFileDto | null {
  return db.transaction(
    (tx) => {
      const before = tx
        .select({ caption: storedFiles.caption, sharedWithCustomer: storedFiles.sharedWithCustomer, siteId: sites.id })
        .from(storedFiles)
        .innerJoin(sites, eq(sites.id, storedFiles.siteId))
        .where(and(eq(storedFiles.id, fileId), fileScope(viewer)))
        .get();
      if (!before) return null;
      const after = {
        caption: patch.caption ?? before.caption,
        sharedWithCustomer: patch.sharedWithCustomer ?? before.sharedWithCustomer,
      };
      tx.update(storedFiles).set(after).where(eq(storedFiles.id, fileId)).run();
      const sharing =
        after.sharedWithCustomer === before.sharedWithCustomer
          ? ""
          : after.sharedWithCustomer
            ? "shared with the customer"
            : "no longer shared with the customer";
      writeAudit(tx, viewer, {
        action: "update",
        entityType: "file",
        entityId: fileId,
        siteId: before.siteId,
        summary: `File ${[sharing, after.caption !== before.caption ? "caption changed" : ""].filter(Boolean).join(", ") || "saved unchanged"}`,
        before: { caption: before.caption, sharedWithCustomer: before.sharedWithCustomer },
        after,
      });
      const row = selectFiles(tx as unknown as Db)
        .where(eq(storedFiles.id, fileId))
        .get();
      return row ? toDto(row) : null;
    },
    { behavior: "immediate" },
  );
}
