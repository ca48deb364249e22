import Link from "next/link";
import type { Viewer } from "@/lib/auth/viewer";
import { SignOutButton } from "./sign-out-button";

const roleLabel = { admin: "Admin", technician: "Technician", customer: "Building owner" } as const;

export function AppHeader({ viewer }: { viewer: Viewer }) {
  return (
    <header className="border-b border-line bg-panel">
      <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-4 gap-y-1 px-4 py-2">
        <Link href="/" className="mr-auto text-lg font-semibold tracking-tight">
          Liftline
        </Link>
        <nav aria-label="Main" className="flex items-center gap-1 text-sm">
          <Link href="/" className="flex min-h-11 items-center rounded px-3 hover:bg-surface">
            Board
          </Link>
          <Link href="/settings/tokens" className="flex min-h-11 items-center rounded px-3 hover:bg-surface">
            API tokens
          </Link>
        </nav>
        <div className="flex items-center gap-2 text-sm">
          <span className="text-muted" data-testid="viewer">
            {viewer.name} · {roleLabel[viewer.role]}
          </span>
          <SignOutButton />
        </div>
      </div>
    </header>
  );
}
