"use client";

import { signOut } from "next-auth/react";
import { clearDeviceData } from "@/components/pwa/service-worker";

export function SignOutButton() {
  return (
    <button
      type="button"
      onClick={() => void clearDeviceData().finally(() => signOut({ callbackUrl: "/sign-in" }))}
      className="min-h-11 rounded px-3 text-sm hover:bg-surface"
    >
      Sign out
    </button>
  );
}
