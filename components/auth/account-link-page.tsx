import Link from "next/link";
import type { AccountLinkStatusDto } from "@/lib/dto/people";
import { accountLinkRefusal } from "@/lib/schemas/people";
import { SetPasswordForm } from "./set-password-form";

/** The public page behind an e-mailed invitation or reset link. */
export function AccountLinkPage({
  token,
  status,
  purpose,
}: {
  token: string;
  status: AccountLinkStatusDto;
  purpose: "invite" | "reset";
}) {
  return (
    <main className="mx-auto flex min-h-screen max-w-sm flex-col justify-center gap-4 px-4 py-10">
      <h1 className="text-3xl font-semibold tracking-tight">Liftline</h1>
      <h2 className="text-xl font-semibold">
        {purpose === "invite" ? "Choose your password" : "Choose a new password"}
      </h2>
      {status.valid && status.purpose === purpose ? (
        <>
          <p className="text-muted">For {status.email}. The link works once.</p>
          <SetPasswordForm token={token} email={status.email} purpose={purpose} />
        </>
      ) : (
        <>
          <p className="rounded border border-line bg-panel px-3 py-2">
            {accountLinkRefusal[status.valid ? "unknown" : status.reason]}
          </p>
          <Link href={purpose === "invite" ? "/sign-in" : "/forgot-password"} className="underline">
            {purpose === "invite" ? "Sign in" : "Ask for a new link"}
          </Link>
        </>
      )}
    </main>
  );
}
