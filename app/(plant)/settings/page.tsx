import type { Metadata } from "next";
import Link from "next/link";
import { NotificationSettings } from "@/components/settings/notification-settings";
import { PasswordForm } from "@/components/settings/password-form";
import { ProfileForm } from "@/components/settings/profile-form";
import { UnitSystemForm } from "@/components/settings/unit-system-form";
import { getAccount } from "@/db/queries/people";
import { canAct } from "@/lib/auth/viewer";
import { getDb } from "@/lib/server/runtime";
import { requirePageViewer } from "../../(auth)/auth";
import { saveUnitSystem } from "./actions";

export const metadata: Metadata = { title: "Settings" };
export const dynamic = "force-dynamic";

export default async function SettingsPage() {
  const viewer = await requirePageViewer();
  const account = getAccount(getDb(), viewer);
  return (
    <section className="flex max-w-xl flex-col gap-6">
      <h1 className="text-2xl font-semibold">Settings</h1>
      <p className="text-muted">
        {viewer.email} · {viewer.role}
        {account ? ` · ${account.organizationName}` : ""}
      </p>
      <ProfileForm name={viewer.name} phone={account?.phone ?? null} />
      <UnitSystemForm unitSystem={viewer.unitSystem} save={saveUnitSystem} />
      <PasswordForm email={viewer.email} />
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
