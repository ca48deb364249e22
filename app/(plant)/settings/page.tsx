import type { Metadata } from "next";
import Link from "next/link";
import { Button } from "@/components/ui/button";
import { requirePageViewer } from "../../(auth)/auth";
import { saveUnitSystem } from "./actions";

export const metadata: Metadata = { title: "Settings" };
export const dynamic = "force-dynamic";

export default async function SettingsPage() {
  const viewer = await requirePageViewer();
  return (
    <section className="flex max-w-xl flex-col gap-6">
      <h1 className="text-2xl font-semibold">Settings</h1>
      <form action={saveUnitSystem} className="flex flex-col gap-3 rounded-lg border border-line bg-panel p-4">
        <fieldset className="flex flex-col gap-2">
          <legend className="font-semibold">Units</legend>
          <label className="flex min-h-11 items-center gap-2">
            <input type="radio" name="unitSystem" value="ip" defaultChecked={viewer.unitSystem === "ip"} /> Inch-pound
            (°F, psig, gpm)
          </label>
          <label className="flex min-h-11 items-center gap-2">
            <input type="radio" name="unitSystem" value="si" defaultChecked={viewer.unitSystem === "si"} /> SI (°C, kPa
            absolute, L/s)
          </label>
        </fieldset>
        <Button type="submit" className="self-start">
          Save
        </Button>
      </form>
      <p>
        <Link href="/settings/tokens" className="underline">
          API tokens
        </Link>{" "}
        — let scripts read the REST API as you.
      </p>
    </section>
  );
}
