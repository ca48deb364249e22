import type { Metadata } from "next";
import { TokenManager } from "@/components/tokens/token-manager";

export const metadata: Metadata = { title: "API tokens" };

export default function TokensPage() {
  return (
    <section>
      <h1 className="text-2xl font-semibold">API tokens</h1>
      <p className="mb-4 mt-1 max-w-prose text-muted">
        A token lets a script read the REST API as you, with exactly your access. Send it as{" "}
        <code>Authorization: Bearer &lt;token&gt;</code>.
      </p>
      <TokenManager />
    </section>
  );
}
