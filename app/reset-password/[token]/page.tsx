import type { Metadata } from "next";
import { AccountLinkPage } from "@/components/auth/account-link-page";
import { accountLinkStatus } from "@/lib/server/account-links";
import { getDb } from "@/lib/server/runtime";

export const metadata: Metadata = { title: "Reset password" };
export const dynamic = "force-dynamic";

// Public: the e-mailed link is the credential. Showing the page never uses the link (mail scanners prefetch it).
export default async function ResetPasswordPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  return <AccountLinkPage token={token} status={accountLinkStatus(getDb(), token)} purpose="reset" />;
}
