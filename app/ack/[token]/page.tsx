import type { Metadata } from "next";
import Link from "next/link";
import { getDb } from "@/lib/server/runtime";
import { getAlarm } from "@/db/queries/alarms";
import { peekAckLink } from "@/db/queries/oncall";
import { getViewerById } from "@/db/queries/users";
import { AckLinkButton } from "@/components/alarms/ack-link-button";
import { ackLinkRefusal as refusal, ACK_TOKEN_PATTERN } from "@/lib/oncall/ack-link";

export const metadata: Metadata = { title: "Acknowledge alarm" };
export const dynamic = "force-dynamic";

function lookUp(token: string) {
  const db = getDb();
  const link = ACK_TOKEN_PATTERN.test(token)
    ? peekAckLink(db, token, Date.now())
    : ({ ok: false, reason: "unknown" } as const);
  const viewer = link.ok ? getViewerById(db, link.userId) : null;
  const alarm = link.ok && viewer ? getAlarm(db, viewer, link.alarmId) : null;
  return { link, viewer, alarm };
}

export default async function AckLinkPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const { link, viewer, alarm } = lookUp(token);
  return (
    <main className="mx-auto flex min-h-screen max-w-md flex-col justify-center gap-4 px-4 py-10">
      <h1 className="text-2xl font-semibold">Liftline</h1>
      {alarm ? (
        <>
          <section className="rounded-lg border border-line bg-panel p-4">
            <p className="text-sm text-muted">
              {alarm.siteName} · {alarm.equipment} · priority {alarm.priority}
            </p>
            <p className="mt-1 font-semibold">{alarm.detail.technicianMessage}</p>
            <p className="mt-2 text-sm text-muted">Acknowledging as {viewer?.name}. The link works once.</p>
          </section>
          <AckLinkButton token={token} />
          <Link href={`/alarms/${alarm.id}`} className="text-center underline">
            Open the alarm
          </Link>
        </>
      ) : (
        <p className="rounded border border-line bg-panel px-3 py-2">{refusal[link.ok ? "unknown" : link.reason]}</p>
      )}
    </main>
  );
}
