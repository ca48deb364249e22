import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { getDb, getRuntime } from "@/lib/server/runtime";
import { listMail } from "@/db/queries/oncall";
import { isAdmin } from "@/lib/auth/viewer";
import { formatDateTime } from "@/lib/client/format";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Outbox" };
export const dynamic = "force-dynamic";

// The local SMTP sink's messages: what would have gone out by e-mail with no SMTP_URL set.
export default async function OutboxPage() {
  const viewer = await requirePageViewer();
  if (!isAdmin(viewer)) notFound();
  const messages = [...(getRuntime()?.heldMail() ?? []), ...listMail(getDb())];
  return (
    <section>
      <h1 className="text-2xl font-semibold">Outbox</h1>
      <p className="mb-4 mt-1 max-w-prose text-muted">
        Mail caught by the local SMTP sink (no SMTP_URL configured). Set SMTP_URL to send real mail.
      </p>
      {messages.length === 0 ? <p className="text-muted">No mail yet.</p> : null}
      <ul className="flex flex-col gap-3">
        {messages.map((m) => (
          <li key={m.id} className="rounded-lg border border-line bg-panel p-4" data-testid="mail">
            <p className="text-sm text-muted">
              {formatDateTime(m.receivedAt)} · to {m.to}
            </p>
            <p className="font-semibold">{m.subject}</p>
            <pre className="mt-2 whitespace-pre-wrap break-words font-sans text-sm">{m.text}</pre>
          </li>
        ))}
      </ul>
    </section>
  );
}
