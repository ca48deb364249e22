import { AppHeader } from "@/components/layout/app-header";
import { SocketProvider } from "@/components/realtime/socket-provider";
import { requirePageViewer } from "../(auth)/auth";

export default async function PlantLayout({ children }: { children: React.ReactNode }) {
  const viewer = await requirePageViewer();
  return (
    <>
      <AppHeader viewer={viewer} />
      <main className="mx-auto max-w-6xl px-4 py-6">
        <SocketProvider>{children}</SocketProvider>
      </main>
    </>
  );
}
