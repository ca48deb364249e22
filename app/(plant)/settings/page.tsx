import type { Metadata } from "next";
import Link from "next/link";
import { NotificationSettings } from "@/components/settings/notification-settings";
import { UnitSystemForm } from "@/components/settings/unit-system-form";
import { canAct } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../(auth)/auth";
import { saveUnitSystem } from "./actions";

export const metadata: Metadata = { title: "Settings" };
export const dynamic = "force-dynamic";

export default async function SettingsPage() {
  const viewer = await requirePageViewer();
  return (
    <section className="flex max-w-xl flex-col gap-6">
      <h1 className="text-2xl font-semibold">Settings</h1>
      <UnitSystemForm unitSystem={viewer.unitSystem} save={saveUnitSystem} />
      <NotificationSettings staff={canAct(viewer)} />
      <p>
        <Link href="/settings/tokens" className="underline">
          API tokens
        </Link>{" "}
        — let scripts read the REST API as you.
      </p>
    </section>
  );
}
