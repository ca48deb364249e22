import { simpleParser } from "mailparser";
import nodemailer from "nodemailer";
import { SMTPServer } from "smtp-server";
import type { Db } from "@/db/client";
import { storeSinkMessage } from "@/db/queries/oncall";

// Outgoing mail through nodemailer over SMTP. Without SMTP_URL the server runs a local SMTP
// sink (smtp-server) on loopback that stores every message for the admin's Outbox page —
// a stand-in for a real mail service, exercised through the same SMTP path.

export interface Mailer {
  send(message: { to: string; subject: string; text: string }): Promise<void>;
  close(): Promise<void>;
  /** The sink's port when it runs, else null. */
  sinkPort: number | null;
}

const MAX_SINK_MESSAGE_BYTES = 1024 * 1024;

async function startSink(
  db: Db,
  port: number,
  log: (line: string) => void,
): Promise<{ server: SMTPServer; port: number }> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    size: MAX_SINK_MESSAGE_BYTES,
    logger: false,
    onData(stream, session, callback) {
      simpleParser(stream)
        .then((mail) => {
          const to = session.envelope.rcptTo.map((r) => r.address).join(", ");
          const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : "";
          storeSinkMessage(db, { from, to, subject: mail.subject ?? "", text: mail.text ?? "" });
          callback();
        })
        .catch((err: Error) => {
          log(`[mail] sink could not store a message: ${err.message}`);
          callback(err);
        });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, "127.0.0.1", () => resolve());
  });
  const address = server.server.address();
  return { server, port: typeof address === "object" && address ? address.port : port };
}

export async function createMailer(opts: {
  db: Db;
  smtpUrl?: string;
  sinkPort: number;
  from: string;
  log: (line: string) => void;
}): Promise<Mailer> {
  let sink: { server: SMTPServer; port: number } | null = null;
  let transport: nodemailer.Transporter;
  if (opts.smtpUrl) {
    transport = nodemailer.createTransport(opts.smtpUrl);
  } else {
    sink = await startSink(opts.db, opts.sinkPort, opts.log);
    transport = nodemailer.createTransport({ host: "127.0.0.1", port: sink.port, secure: false, ignoreTLS: true });
  }
  return {
    sinkPort: sink?.port ?? null,
    async send(message) {
      await transport.sendMail({ from: opts.from, ...message });
    },
    async close() {
      transport.close();
      if (sink) await new Promise<void>((resolve) => sink!.server.close(() => resolve()));
    },
  };
}
