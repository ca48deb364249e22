import { simpleParser } from "mailparser";
import nodemailer from "nodemailer";
import { SMTPServer } from "smtp-server";
import type { Db } from "@/db/client";
import { storeSinkMessage } from "@/db/queries/oncall";
import type { MailDto } from "@/lib/dto/oncall";
import type { StorageHealth } from "./storage-health";

// Outgoing mail through nodemailer over SMTP. Without SMTP_URL the server runs a local SMTP
// sink (smtp-server) on loopback that stores every message for the admin's Outbox page —
// a stand-in for a real mail service, exercised through the same SMTP path.

/** One e-mail: plain text always (the sink and the Outbox show it); HTML and attachments when there are. */
export interface MailMessage {
  to: string;
  subject: string;
  text: string;
  html?: string;
  /** `cid` makes an attachment an inline picture the HTML shows with `<img src="cid:…">`. */
  attachments?: Array<{ filename: string; content: Buffer; contentType: string; cid?: string }>;
}

export interface Mailer {
  send(message: MailMessage): Promise<void>;
  close(): Promise<void>;
  /** The sink's port when it runs, else null. */
  sinkPort: number | null;
  /** Messages the sink took but could not store yet (newest first); stored once the database can be written. */
  held(): MailDto[];
  /** Stores held messages now (after storage recovered). */
  storeHeld(): void;
}

const MAX_SINK_MESSAGE_BYTES = 1024 * 1024;
/** Messages held in memory at most while the database cannot be written (the oldest are dropped). */
const MAX_HELD = 500;

interface SinkMessage {
  from: string;
  to: string;
  subject: string;
  text: string;
  receivedAt: number;
}

/**
 * Where the sink puts what it receives. Mail is how admins hear that the disk is full, so a
 * message that cannot be written is held in memory (and shown in the Outbox) instead of refused.
 */
function sinkStore(db: Db, storage: Pick<StorageHealth, "report" | "ok"> | undefined, log: (line: string) => void) {
  let held: Array<SinkMessage & { id: number }> = [];
  let nextHeldId = -1;
  function storeHeld(): boolean {
    while (held.length) {
      const m = held[held.length - 1];
      try {
        storeSinkMessage(db, m);
      } catch (err) {
        storage?.report(err, "mail sink");
        return false;
      }
      held.pop();
    }
    return true;
  }
  return {
    add(m: SinkMessage) {
      if (storeHeld()) {
        try {
          storeSinkMessage(db, m);
          storage?.ok();
          return;
        } catch (err) {
          if (!storage?.report(err, "mail sink")) throw err;
        }
      }
      log(`[mail] sink holds "${m.subject}" in memory until the database can be written`);
      held.unshift({ ...m, id: nextHeldId-- });
      if (held.length > MAX_HELD) held = held.slice(0, MAX_HELD);
    },
    held: (): MailDto[] => held.map((m) => ({ ...m })),
    storeHeld: () => void storeHeld(),
  };
}

async function startSink(
  store: ReturnType<typeof sinkStore>,
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
          store.add({ from, to, subject: mail.subject ?? "", text: mail.text ?? "", receivedAt: Date.now() });
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
  storage?: Pick<StorageHealth, "report" | "ok">;
}): Promise<Mailer> {
  let sink: { server: SMTPServer; port: number } | null = null;
  let transport: nodemailer.Transporter;
  const store = sinkStore(opts.db, opts.storage, opts.log);
  if (opts.smtpUrl) {
    transport = nodemailer.createTransport(opts.smtpUrl);
  } else {
    sink = await startSink(store, opts.sinkPort, opts.log);
    transport = nodemailer.createTransport({ host: "127.0.0.1", port: sink.port, secure: false, ignoreTLS: true });
  }
  return {
    sinkPort: sink?.port ?? null,
    held: store.held,
    storeHeld: store.storeHeld,
    async send(message) {
      await transport.sendMail({ from: opts.from, ...message });
    },
    async close() {
      transport.close();
      if (sink) await new Promise<void>((resolve) => sink!.server.close(() => resolve()));
    },
  };
}
