import type { Metadata } from "next";
import Link from "next/link";
import { ForgotPasswordForm } from "@/components/auth/forgot-password-form";

export const metadata: Metadata = { title: "Forgot password" };

export default function ForgotPasswordPage() {
  return (
    <main className="mx-auto flex min-h-screen max-w-sm flex-col justify-center gap-4 px-4 py-10">
      <h1 className="text-3xl font-semibold tracking-tight">Liftline</h1>
      <h2 className="text-xl font-semibold">Forgot your password?</h2>
      <p className="text-muted">
        Enter your e-mail address. If it has an account, we send a link to choose a new password.
      </p>
      <ForgotPasswordForm />
      <Link href="/sign-in" className="underline">
        Back to sign-in
      </Link>
    </main>
  );
}
