"use client";

import { useRouter } from "next/navigation";
import { fetchJson } from "@/lib/client/fetcher";
import { ConfirmAction } from "@/components/ui/confirm-action";

/** Retires or restores a site, after saying what that does. */
export function SiteRetirement({ siteId, name, retired }: { siteId: string; name: string; retired: boolean }) {
  const router = useRouter();
  const base = `/api/sites/${encodeURIComponent(siteId)}`;
  if (retired)
    return (
      <ConfirmAction
        label="Restore site…"
        confirmLabel="Restore site"
        onConfirm={async () => {
          await fetchJson(`${base}/restore`, { method: "POST" });
          router.refresh();
        }}
      >
        <p>{name} comes back on the board, its rules run again and its gateways may connect again.</p>
      </ConfirmAction>
    );
  return (
    <ConfirmAction
      label="Retire site…"
      confirmLabel={`Retire ${name}`}
      onConfirm={async () => {
        await fetchJson(base, { method: "DELETE" });
        router.refresh();
      }}
    >
      <p className="font-semibold">Retire {name}?</p>
      <ul className="list-disc pl-5">
        <li>It leaves the board and the site lists.</li>
        <li>Its rules stop: no new alarms from it.</li>
        <li>Its gateways are disconnected and refused when they try again.</li>
        <li>History is kept: readings, alarms and records stay, and the site can be restored.</li>
      </ul>
    </ConfirmAction>
  );
}
