import type { Metadata } from "next";
import { TokenManager } from "@/components/tokens/token-manager";
import { grantableTokenScope } from "@/lib/auth/viewer";
import { requirePageViewer } from "../../../(auth)/auth";

export const metadata: Metadata = { title: "API tokens" };

export const dynamic = "force-dynamic";

export default async function TokensPage() {
  const viewer = await requirePageViewer();
  return (
    <section>
      <h1 className="text-2xl font-semibold">API tokens</h1>
      <p className="mb-4 mt-1 max-w-prose text-muted">
        A token lets a script use the REST API as you, never with more than your access: a <em>read</em> token only
        reads, an <em>act</em> token may also acknowledge, shelve and annotate alarms, an <em>admin</em> token may also
        administer. Give a script the narrowest scope it needs. Send it as{" "}
        <code>Authorization: Bearer &lt;token&gt;</code>.
      </p>
      <TokenManager maxScope={grantableTokenScope(viewer)} />
    </section>
  );
}
