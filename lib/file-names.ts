// File names people upload are shown back in lists and in Content-Disposition headers: they are
// kept as text only, cut to a sane length, and the served name carries the extension of the type
// found in the content, not the one typed.

const EXTENSIONS: Record<string, string> = {
  "image/jpeg": "jpg",
  "image/png": "png",
  "image/webp": "webp",
  "application/pdf": "pdf",
};

export function extensionFor(mediaType: string): string {
  return EXTENSIONS[mediaType] ?? "bin";
}

/** The name as uploaded, without any folder part, control or direction characters; at most 200 characters. */
export function cleanOriginalName(name: string): string {
  const base = name.split(/[\\/]/).pop() ?? "";
  // eslint-disable-next-line no-control-regex
  const cleaned = base.replace(/[\u0000-\u001f\u007f\u202a-\u202e\u2066-\u2069]/g, "").trim();
  return (cleaned || "upload").slice(0, 200);
}

/** An ASCII-only name for the header's `filename=`, with the extension of the stored type. */
export function safeDownloadName(originalName: string, mediaType: string): string {
  const stem = cleanOriginalName(originalName).replace(/\.[^.]*$/, "");
  const ascii =
    stem
      .replace(/[^A-Za-z0-9 ._-]/g, "_")
      .replace(/^[. ]+/, "")
      .slice(0, 100) || "file";
  return `${ascii}.${extensionFor(mediaType)}`;
}

/** `inline` with the ASCII name and the UTF-8 one (RFC 6266 §4.3, RFC 8187). */
export function inlineDisposition(originalName: string, mediaType: string): string {
  const ascii = safeDownloadName(originalName, mediaType);
  const stem = cleanOriginalName(originalName).replace(/\.[^.]*$/, "") || "file";
  const utf8 = encodeURIComponent(`${stem}.${extensionFor(mediaType)}`).replace(
    /['()*]/g,
    (c) => `%${c.charCodeAt(0).toString(16).toUpperCase()}`,
  );
  return `inline; filename="${ascii}"; filename*=UTF-8''${utf8}`;
}
