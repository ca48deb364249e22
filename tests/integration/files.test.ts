import fs from "node:fs";
import path from "node:path";
import Database from "better-sqlite3";
import sharp from "sharp";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signIn, startServer, type TestServer } from "../helpers/server";

// Photos and files against the real server: the type comes from the content (file-type's magic
// numbers), the size limit holds while the body streams in, EXIF (the GPS position above all) is
// gone from what is stored, and a customer sees only its own organization's shared files.

let server: TestServer;
const cookies: Record<string, string> = {};
const accounts = {
  admin: "admin@tallgrass.example",
  technician: "luis@tallgrass.example",
  customer: "facilities@harborview.example",
} as const;
type Who = keyof typeof accounts;
const OWN_SITE = "harborview-mob"; // the customer's own site
const OTHER_SITE = "quarry-ridge-dh2"; // another customer's
const SERVICE_REQUEST = "sr-test-1";

function call(who: Who, urlPath: string, init: RequestInit = {}): Promise<Response> {
  const headers = new Headers(init.headers);
  headers.set("cookie", cookies[who]);
  headers.set("origin", server.url); // as a browser's page would (lib/server/origin.ts)
  return fetch(server.url + urlPath, { ...init, headers });
}

function upload(
  who: Who,
  siteId: string,
  bytes: Uint8Array,
  name: string,
  fields: Record<string, string> = {},
  declaredType = "application/octet-stream",
) {
  const form = new FormData();
  form.set("file", new Blob([new Uint8Array(bytes)], { type: declaredType }), name);
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  return call(who, `/api/sites/${siteId}/files`, { method: "POST", body: form });
}

function db() {
  return new Database(server.databasePath);
}

function storedRowCount(): number {
  const d = db();
  try {
    return (d.prepare("select count(*) as n from stored_files").get() as { n: number }).n;
  } finally {
    d.close();
  }
}

function filesOnDisk(): string[] {
  const root = path.join(server.dataDir, "files");
  if (!fs.existsSync(root)) return [];
  return fs
    .readdirSync(root, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile())
    .map((e) => e.name);
}

const png = () =>
  sharp({ create: { width: 64, height: 48, channels: 3, background: "#2a7" } })
    .png()
    .toBuffer();

beforeAll(async () => {
  server = await startServer();
  for (const [role, email] of Object.entries(accounts)) {
    const res = await signIn(server.url, email);
    expect(res.cookie, `sign-in of ${role}`).toBeTruthy();
    cookies[role] = res.cookie!;
  }
  // The service-request routes are built elsewhere; the customer's request is put in directly.
  const d = db();
  const customer = d.prepare("select id from users where email = ?").get(accounts.customer) as { id: string };
  d.prepare(
    "insert into service_requests (id, site_id, requested_by, description, urgency, callback_phone, updated_at) values (?, ?, ?, ?, ?, ?, ?)",
  ).run(SERVICE_REQUEST, OWN_SITE, customer.id, "Chiller 2 shows a fault", "today", "555-0100", Date.now());
  d.close();
}, 180_000);

afterAll(async () => {
  await server?.stop();
});

describe("uploads: type from the content", () => {
  it("stores a PNG named .pdf as a PNG, and serves it as one", async () => {
    const res = await upload("technician", OWN_SITE, await png(), "nameplate.pdf", {}, "application/pdf");
    expect(res.status).toBe(201);
    const { file } = await res.json();
    expect(file.mediaType).toBe("image/png");
    expect(file.originalName).toBe("nameplate.pdf");

    const got = await call("technician", file.url);
    expect(got.status).toBe(200);
    expect(got.headers.get("content-type")).toBe("image/png");
    expect(got.headers.get("x-content-type-options")).toBe("nosniff");
    expect(got.headers.get("cache-control")).toMatch(/private/);
    expect(got.headers.get("content-disposition")).toMatch(/^inline; filename="nameplate\.png"/);
    expect((await sharp(Buffer.from(await got.arrayBuffer())).metadata()).format).toBe("png");

    const thumb = await call("technician", file.thumbnailUrl);
    expect(thumb.headers.get("content-type")).toBe("image/webp");
    const meta = await sharp(Buffer.from(await thumb.arrayBuffer())).metadata();
    expect(meta.format).toBe("webp");
    // 64 px wide: a thumbnail is never enlarged past the photo.
    expect(meta.width).toBe(64);
  });

  it("refuses an executable named .jpg, and a script, storing nothing", async () => {
    const rows = storedRowCount();
    const disk = filesOnDisk().length;
    // An ELF header (System V ABI: 0x7F 'E' 'L' 'F', 64-bit, little-endian), padded.
    const elf = new Uint8Array(256);
    elf.set([0x7f, 0x45, 0x4c, 0x46, 0x02, 0x01, 0x01, 0x00]);
    elf.set([0x02, 0x00, 0x3e, 0x00, 0x01, 0x00, 0x00, 0x00], 16);
    for (const [bytes, name] of [
      [elf, "photo.jpg"],
      [new TextEncoder().encode("#!/bin/sh\necho hello\n"), "tower.jpg"],
    ] as const) {
      const res = await upload("technician", OWN_SITE, bytes, name, {}, "image/jpeg");
      expect(res.status).toBe(415);
      const body = await res.json();
      expect(body.error.code).toBe("unsupported_media_type");
      expect(body.error.message).toMatch(/Only photos \(JPEG, PNG, WebP, HEIC\) and PDF/);
    }
    expect(storedRowCount()).toBe(rows);
    expect(filesOnDisk().length).toBe(disk);
  });

  it("accepts a PDF by its content", async () => {
    const pdf = new TextEncoder().encode(
      "%PDF-1.4\n1 0 obj<</Type/Catalog/Pages 2 0 R>>endobj\n2 0 obj<</Type/Pages/Count 0/Kids[]>>endobj\ntrailer<</Root 1 0 R>>\n%%EOF\n",
    );
    const res = await upload("technician", OWN_SITE, pdf, "service report", { caption: "Start-up sheet" });
    expect(res.status).toBe(201);
    const { file } = await res.json();
    expect(file.mediaType).toBe("application/pdf");
    expect(file.thumbnailUrl).toBeNull();
    const got = await call("technician", file.url);
    expect(got.headers.get("content-disposition")).toMatch(/^inline; filename="service report\.pdf"/);
    expect(new Uint8Array(await got.arrayBuffer())).toEqual(pdf);
  });
});

describe("uploads: size limit", () => {
  const limitMessage = /larger than 15 MB/;

  it("refuses a 40 MB file with a clear message and stores nothing (Content-Length declared)", async () => {
    const rows = storedRowCount();
    const disk = filesOnDisk().length;
    const res = await upload("technician", OWN_SITE, new Uint8Array(40 * 1024 * 1024), "big.jpg");
    expect(res.status).toBe(413);
    const body = await res.json();
    expect(body.error.code).toBe("payload_too_large");
    expect(body.error.message).toMatch(limitMessage);
    expect(storedRowCount()).toBe(rows);
    expect(filesOnDisk().length).toBe(disk);
  });

  it("refuses a 40 MB body sent without a length, counting while it reads", async () => {
    const rows = storedRowCount();
    const disk = filesOnDisk().length;
    const boundary = "liftline-test-boundary";
    const head = new TextEncoder().encode(
      `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="big.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`,
    );
    const chunk = new Uint8Array(1024 * 1024);
    let sent = 0;
    const body = new ReadableStream<Uint8Array>({
      pull(controller) {
        if (sent === 0) controller.enqueue(head);
        if (sent >= 40) {
          controller.enqueue(new TextEncoder().encode(`\r\n--${boundary}--\r\n`));
          controller.close();
          return;
        }
        sent++;
        controller.enqueue(chunk);
      },
    });
    const res = await call("technician", `/api/sites/${OWN_SITE}/files`, {
      method: "POST",
      headers: { "content-type": `multipart/form-data; boundary=${boundary}` },
      body,
      duplex: "half",
    } as RequestInit);
    expect(res.status).toBe(413);
    expect((await res.json()).error.message).toMatch(limitMessage);
    // Refused before the whole body was pulled: the server stopped reading shortly past 15 MB.
    expect(sent).toBeLessThan(40);
    expect(storedRowCount()).toBe(rows);
    expect(filesOnDisk().length).toBe(disk);
  });
});

describe("uploads: EXIF", () => {
  it("removes the GPS position and applies the orientation", async () => {
    // A photo as a phone writes it: 80×40 pixels, EXIF orientation 6 (rotate 90° clockwise to view),
    // a GPS IFD (CIPA DC-008 / EXIF 2.3: IFD0 tag 0x8825 points at it) and the camera make.
    const jpeg = await sharp({ create: { width: 80, height: 40, channels: 3, background: "#336699" } })
      .jpeg()
      .withExif({
        IFD0: { Make: "TestCam" },
        IFD3: {
          GPSLatitudeRef: "N",
          GPSLatitude: "40/1 26/1 46/1",
          GPSLongitudeRef: "W",
          GPSLongitude: "79/1 58/1 56/1",
        },
      })
      .withMetadata({ orientation: 6 })
      .toBuffer();
    const before = await sharp(jpeg).metadata();
    // Little-endian TIFF: tag 0x8825 is stored as bytes 25 88.
    expect(before.exif?.includes(Buffer.from([0x25, 0x88]))).toBe(true);
    expect(before.exif?.includes(Buffer.from("TestCam"))).toBe(true);
    expect(before.orientation).toBe(6);

    const res = await upload("technician", OWN_SITE, jpeg, "drive-fault.jpg", { caption: "Drive fault screen" });
    expect(res.status).toBe(201);
    const { file } = await res.json();
    expect(file.mediaType).toBe("image/jpeg");
    const stored = Buffer.from(await (await call("technician", file.url)).arrayBuffer());
    const after = await sharp(stored).metadata();
    expect(after.exif).toBeUndefined();
    expect(after.xmp).toBeUndefined();
    expect(after.orientation).toBeUndefined();
    expect(stored.includes(Buffer.from("TestCam"))).toBe(false);
    // Orientation 6 applied to the pixels: 80×40 becomes 40×80.
    expect([after.width, after.height]).toEqual([40, 80]);
  });

  it("keeps files owner-only on disk, under random names", () => {
    const root = path.join(server.dataDir, "files");
    for (const entry of fs.readdirSync(root, { recursive: true, withFileTypes: true })) {
      const full = path.join(entry.parentPath, entry.name);
      const mode = fs.statSync(full).mode & 0o777;
      expect(mode, full).toBe(entry.isDirectory() ? 0o700 : 0o600);
      if (entry.isFile()) expect(entry.name).toMatch(/^[0-9a-f]{32}$/);
    }
  });
});

describe("files: who sees what", () => {
  let unshared: { id: string; url: string };
  let otherOrg: { id: string; url: string };

  beforeAll(async () => {
    unshared = (await (await upload("technician", OWN_SITE, await png(), "tower.png")).json()).file;
    const res = await upload("admin", OTHER_SITE, await png(), "other.png", { shared: "true" });
    expect(res.status).toBe(201);
    otherOrg = (await res.json()).file;
  });

  it("a customer gets 404 for an unshared file of its own site", async () => {
    expect((await call("customer", unshared.url)).status).toBe(404);
    expect((await call("customer", `${unshared.url}/thumbnail`)).status).toBe(404);
    const { files } = await (await call("customer", `/api/sites/${OWN_SITE}/files`)).json();
    expect(files.map((f: { id: string }) => f.id)).not.toContain(unshared.id);
  });

  it("a customer gets 404 for a shared file of another organization, and for its site's list", async () => {
    expect((await call("technician", otherOrg.url)).status).toBe(200);
    expect((await call("customer", otherOrg.url)).status).toBe(404);
    expect((await call("customer", `/api/sites/${OTHER_SITE}/files`)).status).toBe(404);
  });

  it("staff share a file (audited); the customer then sees it but cannot change it", async () => {
    const shared = await call("technician", unshared.url, {
      method: "PATCH",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ sharedWithCustomer: true, caption: "Tower basin after cleaning" }),
    });
    expect(shared.status).toBe(200);
    expect((await shared.json()).file.sharedWithCustomer).toBe(true);
    expect((await call("customer", unshared.url)).status).toBe(200);
    const { files } = await (await call("customer", `/api/sites/${OWN_SITE}/files`)).json();
    expect(files.map((f: { id: string }) => f.id)).toContain(unshared.id);

    const refused = await call("customer", unshared.url, {
      method: "PATCH",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ sharedWithCustomer: false }),
    });
    expect(refused.status).toBe(403);

    const d = db();
    const audit = d
      .prepare("select before, after from audit_log where entity_type = 'file' and entity_id = ?")
      .all(unshared.id) as { before: string; after: string }[];
    d.close();
    expect(audit).toHaveLength(1);
    expect(JSON.parse(audit[0].before).sharedWithCustomer).toBe(false);
    expect(JSON.parse(audit[0].after).sharedWithCustomer).toBe(true);
  });

  it("a customer uploads only with a service request of its own site; its photo is shared with it", async () => {
    const without = await upload("customer", OWN_SITE, await png(), "leak.png");
    expect(without.status).toBe(404);
    const elsewhere = await upload("customer", OTHER_SITE, await png(), "leak.png", {
      serviceRequestId: SERVICE_REQUEST,
    });
    expect(elsewhere.status).toBe(404);
    const withRequest = await upload("customer", OWN_SITE, await png(), "leak.png", {
      serviceRequestId: SERVICE_REQUEST,
      shared: "false",
    });
    expect(withRequest.status).toBe(201);
    const { file } = await withRequest.json();
    expect(file.sharedWithCustomer).toBe(true);
    expect((await call("customer", file.url)).status).toBe(200);
  });
});
