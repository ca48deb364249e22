import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { getDb } from "@/lib/server/runtime";
import { getSite } from "@/db/queries/sites";
import { RuleSettingsEditor } from "@/components/sites/rule-settings-editor";
import { canAct, isAdmin } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../../../(auth)/auth";

export const metadata: Metadata = { title: "Rule settings" };
export const dynamic = "force-dynamic";

export default async function RuleSettingsPage({ params }: { params: Promise<{ siteId: string }> }) {
  const viewer = await requirePageViewer();
  const site = getSite(getDb(), viewer, (await params).siteId);
  if (!site || !canAct(viewer)) notFound();
  return (
    <section className="flex flex-col gap-3">
      <p className="text-sm">
        <Link href={`/sites/${site.id}`} className="underline">
          {site.name}
        </Link>
      </p>
      <h1 className="text-2xl font-semibold">Rule settings</h1>
      <p className="max-w-prose text-muted">
        Units are canonical: temperatures °C, temperature differences K, pressures kPa absolute, times in seconds. Each
        rule, its settings and where the defaults come from are described in <code>lib/rules/README.md</code>. Example:{" "}
        <code>{'{ "crossoverRisk": { "warnTimeToCrossoverS": 2400 } }'}</code>
      </p>
      <RuleSettingsEditor siteId={site.id} canEdit={isAdmin(viewer)} />
    </section>
  );
}
