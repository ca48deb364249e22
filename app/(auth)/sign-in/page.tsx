import type { Metadata } from "next";
import Link from "next/link";
import { redirect } from "next/navigation";
import { SignInForm } from "@/components/auth/sign-in-form";
import { getViewer } from "../auth";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage() {
  if (await getViewer()) redirect("/");
  return (
    <main className="mx-auto flex min-h-screen max-w-sm flex-col justify-center px-4 py-10">
      <h1 className="text-3xl font-semibold tracking-tight">Liftline</h1>
      <p className="mb-8 mt-1 text-muted">Chilled-water plants, live, for the on-call technician.</p>
      <SignInForm />
      <Link href="/forgot-password" className="mt-4 text-center underline">
        Forgot password?
      </Link>
    </main>
  );
}
