import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getDb } from "@/lib/server/runtime";
import { getSite } from "@/db/queries/sites";
import { GatewayManager } from "@/components/gateways/gateway-manager";
import { isAdmin } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../../../(auth)/auth";

export const metadata: Metadata = { title: "Gateways" };
export const dynamic = "force-dynamic";

export default async function SiteGatewaysPage({ params }: { params: Promise<{ siteId: string }> }) {
  const viewer = await requirePageViewer();
  const site = getSite(getDb(), viewer, (await params).siteId);
  if (!site || !isAdmin(viewer)) notFound();
  return (
    <section>
      <p className="text-sm">
        <Link href={`/sites/${site.id}`} className="underline">
          {site.name}
        </Link>
      </p>
      <h1 className="mb-1 text-2xl font-semibold">Gateways</h1>
      <p className="mb-4 max-w-prose text-muted">
        Each gateway connects to Liftline&apos;s MQTT broker with its own credentials and may publish only on its own
        topics. The wire contract is in <code>gateway/PROTOCOL.md</code>.
      </p>
      <GatewayManager siteId={site.id} timeZone={site.timeZone} />
    </section>
  );
}
