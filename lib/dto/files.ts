/** An uploaded photo or PDF as screens and the API show it (never the storage keys). */
export interface StoredFileDto {
  id: string;
  siteId: string;
  visitId: string | null;
  serviceRequestId: string | null;
  /** From the content, not the name. */
  mediaType: string;
  bytes: number;
  originalName: string;
  caption: string;
  sharedWithCustomer: boolean;
  uploadedBy: { id: string; name: string };
  createdAt: number;
  url: string;
  /** A small WebP preview; null for PDFs. */
  thumbnailUrl: string | null;
}
