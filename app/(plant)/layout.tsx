import { AppHeader } from "@/components/layout/app-header";
import { StorageAlarmBanner } from "@/components/layout/storage-alarm-banner";
import { ServiceWorkerRegistration } from "@/components/pwa/service-worker";
import { SocketProvider } from "@/components/realtime/socket-provider";
import { UnitSystemProvider } from "@/components/layout/unit-system";
import { canAct } from "@/lib/auth/viewer";
import { parseThemeChoice, THEME_COOKIE } from "@/lib/theme";
import { cookies } from "next/headers";
import { storageHealth } from "@/lib/server/runtime";
import { requirePageViewer } from "../(auth)/auth";

export default async function PlantLayout({ children }: { children: React.ReactNode }) {
  const viewer = await requirePageViewer();
  // Staff only: a building owner can do nothing about the server's disk.
  const staff = canAct(viewer);
  const problem = staff ? storageHealth().problem() : null;
  return (
    <>
      <AppHeader viewer={viewer} theme={parseThemeChoice((await cookies()).get(THEME_COOKIE)?.value)} />
      <ServiceWorkerRegistration />
      {staff ? (
        <StorageAlarmBanner
          initial={
            problem
              ? { kind: problem.kind, reason: problem.reason, since: new Date(problem.sinceMs).toISOString() }
              : null
          }
        />
      ) : null}
      <main className="mx-auto max-w-6xl px-4 py-6">
        <UnitSystemProvider unitSystem={viewer.unitSystem}>
          <SocketProvider>{children}</SocketProvider>
        </UnitSystemProvider>
      </main>
    </>
  );
}
