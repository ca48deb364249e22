import { simpleParser, type ParsedMail } from "mailparser";
import pdfParse from "pdf-parse/lib/pdf-parse.js";
import sharp from "sharp";
import { SMTPServer } from "smtp-server";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import {
  adminCookie,
  api,
  connectGateway,
  endClient,
  provisionGateway,
  publishQos1,
  putPointMap,
  readingsMessage,
  waitFor,
} from "../helpers/mqtt";
import { freePort, signIn, startServer, type TestServer } from "../helpers/server";

// The customer's report against the real server, end to end through SMTP: a customer's service
// request reaches the on-call technician, becomes a visit with a finding, is closed, and its report
// is e-mailed to the site contact with the PDF attached. The server mails through SMTP_URL to an SMTP
// sink this test runs, so the whole message (attachment included) can be parsed with mailparser.

let server: TestServer;
let sink: SMTPServer;
const received: ParsedMail[] = [];
const cookies: Record<string, string> = {};

beforeAll(async () => {
  const smtpPort = await freePort();
  sink = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((mail) => {
          received.push(mail);
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve) => sink.listen(smtpPort, "127.0.0.1", () => resolve()));
  server = await startServer({ env: { SMTP_URL: `smtp://127.0.0.1:${smtpPort}` } });
  for (const [who, email] of Object.entries({
    tech: "luis@tallgrass.example",
    owner: "facilities@harborview.example",
    otherOwner: "ops@quarryridge.example",
  })) {
    cookies[who] = (await signIn(server.url, email)).cookie!;
  }
}, 180_000);

afterAll(async () => {
  await server?.stop();
  await new Promise<void>((resolve) => (sink ? sink.close(() => resolve()) : resolve()));
});

const post = (who: string, path: string, body: unknown) =>
  api(server, cookies[who], path, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });

/** Twenty minutes of CH-1's loop temperatures, so the report has a trend to draw (the simulator is off in tests). */
async function publishLoopTemperatures() {
  const admin = await adminCookie(server);
  const gw = await provisionGateway(server, admin, { siteId: "harborview-mob" });
  const csv =
    "gateway_point,equipment,quantity,unit\nCH1-LCHWT,CH-1,chilled_water_leaving_temp,degF\nCH1-ECWT,CH-1,condenser_water_entering_temp,degF\n";
  expect((await putPointMap(server, admin, gw.gateway.id, csv)).status).toBe(200);
  const client = await connectGateway(server, gw);
  const t0 = Date.now() - 20 * 60_000;
  for (let i = 0; i <= 10; i++) {
    const ts = new Date(t0 + i * 120_000).toISOString();
    const readings = [
      { point: "CH1-LCHWT", value: 44 + i * 0.2, ts },
      { point: "CH1-ECWT", value: 85 - i * 0.3, ts },
    ];
    await publishQos1(client, `liftline/${gw.gateway.id}/readings`, readingsMessage(readings, i + 1, ts));
  }
  await endClient(client);
}

const addressesOf = (mail: ParsedMail) =>
  (Array.isArray(mail.to) ? mail.to : mail.to ? [mail.to] : []).flatMap((a) => a.value.map((v) => v.address));

async function pdfBytes(who: string, visitId: string) {
  const res = await fetch(`${server.url}/api/visits/${visitId}/report.pdf`, { headers: { cookie: cookies[who] } });
  return { status: res.status, type: res.headers.get("content-type"), bytes: Buffer.from(await res.arrayBuffer()) };
}

/** A small PNG photo attached to the visit, shared with the customer or not. */
async function uploadPhoto(visitId: string, caption: string, shared: boolean) {
  const png = await sharp({ create: { width: 64, height: 48, channels: 3, background: "#2a6f97" } })
    .png()
    .toBuffer();
  const form = new FormData();
  form.set("file", new Blob([new Uint8Array(png)], { type: "image/png" }), "strainer.png");
  form.set("visitId", visitId);
  form.set("caption", caption);
  form.set("shared", String(shared));
  return fetch(`${server.url}/api/sites/harborview-mob/files`, {
    method: "POST",
    headers: { cookie: cookies.tech, origin: server.url },
    body: form,
  });
}

const sharedCaption = "Strainer basket before cleaning";
const unsharedCaption = "Controller service menu for our own records";

describe("the customer's visit report", { timeout: 120_000 }, () => {
  const finding = "Condenser water strainer half blocked with scale";
  const summary = "Cleaned the strainer and checked condenser water flow";
  let visitId: string;

  it("runs from a customer's service request to a PDF report e-mailed to the site contact", async () => {
    const created = await post("owner", "/api/service-requests", {
      siteId: "harborview-mob",
      description: "Third floor too warm since the morning",
      urgency: "today",
      callbackPhone: "+1 555 0142",
    });
    expect(created.status).toBe(201);
    // The demo rota puts Luis on call first (db/seed/demo.ts).
    const onCall = await waitFor(async () => received.find((m) => m.text?.includes("Third floor too warm")), 20_000);
    expect(addressesOf(onCall)).toEqual(["luis@tallgrass.example"]);

    const opened = await post("tech", "/api/visits", { serviceRequestId: created.body.request.id, mode: "on_site" });
    expect(opened.status).toBe(201);
    visitId = opened.body.visit.id;
    await publishLoopTemperatures();
    expect((await post("tech", `/api/visits/${visitId}/entries`, { text: finding })).status).toBe(201);
    expect((await uploadPhoto(visitId, sharedCaption, true)).status).toBe(201);
    expect((await uploadPhoto(visitId, unsharedCaption, false)).status).toBe(201);

    // Before it is closed and sent: staff preview it, the customer and other organizations see nothing.
    const preview = await pdfBytes("tech", visitId);
    expect(preview.status).toBe(200);
    expect(preview.type).toBe("application/pdf");
    expect((await pdfBytes("owner", visitId)).status).toBe(404);
    expect((await post("tech", `/api/visits/${visitId}/report`, {})).status).toBe(409);

    expect((await post("tech", `/api/visits/${visitId}/close`, { summary })).status).toBe(200);
    expect((await post("owner", `/api/visits/${visitId}/report`, {})).status).toBe(403);
    expect((await post("otherOwner", `/api/visits/${visitId}/report`, {})).status).toBe(404);
    expect((await post("tech", `/api/visits/${visitId}/report`, { extra: 1 })).status).toBe(400);

    const sent = await post("tech", `/api/visits/${visitId}/report`, {});
    expect(sent.status).toBe(201);
    expect(sent.body.report).toMatchObject({ visitId, recipients: ["facilities@harborview.example"] });

    const mail = await waitFor(
      async () => received.find((m) => addressesOf(m).includes("facilities@harborview.example")),
      20_000,
    );
    expect(mail.subject).toContain("Harborview Medical Office Building");
    expect(mail.html || "").toContain(finding);
    const attachment = mail.attachments.find((a) => a.contentType === "application/pdf");
    expect(attachment).toBeDefined();
    // A PDF file begins with the "%PDF-" header (ISO 32000-1:2008, 7.5.2 File Header).
    expect(attachment!.content.subarray(0, 5).toString("latin1")).toBe("%PDF-");
    // pdf-parse's bundled pdf.js reads a Uint8Array; handed a Buffer it misreads the cross-reference table.
    const { text } = await pdfParse(new Uint8Array(attachment!.content));
    const flat = text.replace(/\s+/g, " ");
    expect(flat).toContain(finding);
    expect(flat).toContain(summary);
    expect(flat).toContain("Luis Ferreira");
    expect(flat).toContain("Harborview Medical Office Building");
    // Photos marked to share are drawn (an image XObject, ISO 32000-1:2008, 8.9.5) with their caption; others are left out.
    expect(flat).toContain(sharedCaption);
    expect(flat).not.toContain(unsharedCaption);
    // The simulated plant has been publishing since the server started: the key temperatures are drawn
    // as a second image, captioned, and ride in the e-mail as an inline PNG (PNG signature, ISO/IEC 15948 §5.2).
    expect(flat).toContain("Chilled water leaving and condenser water entering each chiller during the visit");
    expect(attachment!.content.toString("latin1").match(/\/Subtype \/Image/g)).toHaveLength(2);
    const trend = mail.attachments.find((a) => a.contentType === "image/png");
    expect(trend?.cid).toBe("key-temperatures");
    expect(trend!.content.subarray(0, 8).toString("hex")).toBe("89504e470d0a1a0a");
    // mailparser inlines cid: pictures as data: URLs when it parses the HTML.
    expect(mail.html || "").toMatch(
      /<img src="(cid:key-temperatures|data:image\/png;base64,[^"]+)" alt="Chilled water leaving/,
    );
  });

  it("lets the site's customer read the sent report, and nobody else's customers", async () => {
    const own = await pdfBytes("owner", visitId);
    expect(own.status).toBe(200);
    expect((await pdfParse(new Uint8Array(own.bytes))).text.replace(/\s+/g, " ")).toContain(finding);
    expect((await pdfBytes("otherOwner", visitId)).status).toBe(404);
    const list = await api(server, cookies.owner, `/api/visits/${visitId}/report`);
    expect(list.body.reports).toHaveLength(1);
    expect((await api(server, cookies.otherOwner, `/api/visits/${visitId}/report`)).status).toBe(404);
    const signedOut = await fetch(`${server.url}/api/visits/${visitId}/report.pdf`);
    expect(signedOut.status).toBe(401);
  });

  it("lists the sent report on the customer's site page and offers preview and sending on the visit page", async () => {
    const page = async (who: string, path: string) =>
      (await fetch(`${server.url}${path}`, { headers: { cookie: cookies[who] } })).text();
    const sitePage = await page("owner", "/sites/harborview-mob");
    expect(sitePage).toContain(`/api/visits/${visitId}/report.pdf`);
    expect(sitePage).toContain("Visit reports");
    const visitPage = await page("tech", `/visits/${visitId}`);
    expect(visitPage).toContain("Preview report");
    expect(visitPage).toContain("Send report to the site&#x27;s contacts");
  });

  it("may be sent again, each sending on record", async () => {
    expect((await post("tech", `/api/visits/${visitId}/report`, {})).status).toBe(201);
    const list = await api(server, cookies.tech, `/api/visits/${visitId}/report`);
    expect(list.body.reports).toHaveLength(2);
    await waitFor(
      async () => received.filter((m) => addressesOf(m).includes("facilities@harborview.example")).length === 2,
      20_000,
    );
  });
});
