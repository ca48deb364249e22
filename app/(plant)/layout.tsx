import { AppHeader } from "@/components/layout/app-header";
import { requirePageViewer } from "../(auth)/auth";

export default async function PlantLayout({ children }: { children: React.ReactNode }) {
  const viewer = await requirePageViewer();
  return (
    <>
      <AppHeader viewer={viewer} />
      <main className="mx-auto max-w-6xl px-4 py-6">{children}</main>
    </>
  );
}
