import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { SimulatorConsole } from "@/components/simulator/simulator-console";
import { isAdmin } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "Simulated sites" };

export default async function SimulatorPage() {
  const viewer = await requirePageViewer();
  if (!isAdmin(viewer)) notFound();
  return (
    <section>
      <h1 className="mb-4 text-2xl font-semibold">Simulated sites</h1>
      <SimulatorConsole />
    </section>
  );
}
