import Link from "next/link";
import { canAct, isAdmin, type Viewer } from "@/lib/auth/viewer";
import type { ThemeChoice } from "@/lib/theme";
import { SignOutButton } from "./sign-out-button";
import { ThemeSwitch } from "./theme-switch";

const roleLabel = { admin: "Admin", technician: "Technician", customer: "Building owner" } as const;

export function AppHeader({ viewer, theme }: { viewer: Viewer; theme: ThemeChoice }) {
  const links = [
    { href: "/", label: "Board" },
    { href: "/alarms", label: "Alarms" },
    { href: "/incidents", label: "Incidents" },
    ...(canAct(viewer) ? [{ href: "/on-call", label: "On call" }] : []),
    ...(canAct(viewer) ? [{ href: "/drills", label: "Drills" }] : []),
    ...(isAdmin(viewer) ? [{ href: "/admin", label: "Admin" }] : []),
    { href: "/settings", label: "Settings" },
  ];
  return (
    <header className="border-b border-line bg-panel">
      <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-4 gap-y-1 px-4 py-2">
        <Link href="/" className="mr-auto text-lg font-semibold tracking-tight">
          Liftline
        </Link>
        <div className="flex flex-wrap items-center gap-2 text-sm">
          <span className="text-muted" data-testid="viewer">
            {viewer.name} · {roleLabel[viewer.role]}
          </span>
          <ThemeSwitch initial={theme} />
          <SignOutButton />
        </div>
        <nav aria-label="Main" className="-mx-3 flex w-full flex-wrap items-center text-sm sm:mx-0 sm:w-auto">
          {links.map((l) => (
            <Link key={l.href} href={l.href} className="flex min-h-11 items-center rounded px-3 hover:bg-surface">
              {l.label}
            </Link>
          ))}
        </nav>
      </div>
    </header>
  );
}
