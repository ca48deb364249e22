import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { listSmsSinkMessages } from "@/db/queries/notify";
import { isAdmin } from "@/lib/auth/viewer";
import { formatDateTime } from "@/lib/client/format";
import { getDb } from "@/lib/server/runtime";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Texts" };
export const dynamic = "force-dynamic";

// The local fake SMS API's messages: what would have been texted with no SMS provider configured,
// and the replies sent to it.
export default async function TextsPage() {
  const viewer = await requirePageViewer();
  if (!isAdmin(viewer)) notFound();
  const messages = listSmsSinkMessages(getDb(), viewer);
  return (
    <section>
      <h1 className="text-2xl font-semibold">Texts</h1>
      <p className="mb-4 mt-1 max-w-prose text-muted">
        Text messages caught by the local fake SMS API (no SMS_API_KEY configured), and replies to them. Set SMS_API_KEY
        to send real texts.
      </p>
      {messages.length === 0 ? <p className="text-muted">No texts yet.</p> : null}
      <ul className="flex flex-col gap-3">
        {messages.map((m) => (
          <li key={m.id} className="rounded-lg border border-line bg-panel p-4" data-testid="text">
            <p className="text-sm text-muted">
              {formatDateTime(m.receivedAt)} · {m.direction === "outbound" ? `to ${m.to}` : `reply from ${m.from}`}
            </p>
            <p className="mt-1 break-words">{m.body}</p>
          </li>
        ))}
      </ul>
    </section>
  );
}
