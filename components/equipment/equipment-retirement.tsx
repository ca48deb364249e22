"use client";

import { useRouter } from "next/navigation";
import { fetchJson } from "@/lib/client/fetcher";
import { ConfirmAction } from "@/components/ui/confirm-action";

/** Retires or restores one piece of equipment, after saying what that does. */
export function EquipmentRetirement({
  equipmentId,
  tag,
  retired,
}: {
  equipmentId: string;
  tag: string;
  retired: boolean;
}) {
  const router = useRouter();
  const base = `/api/equipment/${encodeURIComponent(equipmentId)}`;
  if (retired)
    return (
      <ConfirmAction
        label="Restore equipment…"
        confirmLabel={`Restore ${tag}`}
        onConfirm={async () => {
          await fetchJson(`${base}/restore`, { method: "POST" });
          router.refresh();
        }}
      >
        <p>{tag} comes back on the site and its rules use it again from the next reading.</p>
      </ConfirmAction>
    );
  return (
    <ConfirmAction
      label="Retire equipment…"
      confirmLabel={`Retire ${tag}`}
      onConfirm={async () => {
        await fetchJson(base, { method: "DELETE" });
        router.refresh();
      }}
    >
      <p className="font-semibold">Retire {tag}?</p>
      <ul className="list-disc pl-5">
        <li>The rules stop using it; its points no longer raise alarms.</li>
        <li>Its points and their history are kept, and it can be restored.</li>
        <li>Its tag stays taken at this site while it is retired.</li>
      </ul>
    </ConfirmAction>
  );
}
