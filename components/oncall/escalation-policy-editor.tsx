"use client";

import { useState } from "react";
import { Button } from "@/components/ui/button";
import type { PolicyDto } from "@/lib/dto/notify";
import { fetchJson } from "@/lib/client/fetcher";
import { notificationPaths, pathLabel, type NotificationPath } from "@/lib/notify/policy";
import { policySchema } from "@/lib/schemas/notify";

const priorityName: Record<number, string> = { 1: "Critical", 2: "High", 3: "Medium", 4: "Low" };
const minutes = (s: number | null) => (s === null ? "" : String(s / 60));
const seconds = (m: string) => (m.trim() === "" ? null : Math.round(Number(m) * 60));

function PolicyRow({ policy }: { policy: PolicyDto }) {
  const [paths, setPaths] = useState<NotificationPath[]>(policy.paths);
  const [backup, setBackup] = useState(minutes(policy.backupAfterS));
  const [admins, setAdmins] = useState(minutes(policy.adminsAfterS));
  const [message, setMessage] = useState<string | null>(null);

  async function save() {
    setMessage(null);
    const parsed = policySchema.safeParse({ paths, backupAfterS: seconds(backup), adminsAfterS: seconds(admins) });
    if (!parsed.success) return setMessage(parsed.error.issues[0]?.message ?? "Not valid");
    try {
      await fetchJson(`/api/notify/policies/${policy.priority}`, { method: "PUT", body: JSON.stringify(parsed.data) });
      setMessage("Saved.");
    } catch (err) {
      setMessage((err as Error).message);
    }
  }

  return (
    <li
      className="flex flex-col gap-3 rounded-lg border border-line bg-panel p-4"
      data-testid={`policy-${policy.priority}`}
    >
      <h2 className="font-semibold">
        {priorityName[policy.priority]} (priority {policy.priority})
      </h2>
      <p className="text-sm text-muted">Default: {policy.reason}</p>
      <fieldset className="flex flex-wrap gap-4">
        <legend className="text-sm font-semibold">Paths</legend>
        {notificationPaths.map((p) => (
          <label key={p} className="flex min-h-11 items-center gap-2">
            <input
              type="checkbox"
              checked={paths.includes(p)}
              onChange={(e) => setPaths(e.target.checked ? [...paths, p] : paths.filter((x) => x !== p))}
            />
            {pathLabel[p]}
          </label>
        ))}
      </fieldset>
      <div className="flex flex-wrap gap-4">
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Backup after (min, empty: never)
          <input
            className="min-h-11 rounded border border-line bg-panel px-3 text-base font-normal"
            inputMode="decimal"
            value={backup}
            onChange={(e) => setBackup(e.target.value)}
          />
        </label>
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Admins after (min, empty: never)
          <input
            className="min-h-11 rounded border border-line bg-panel px-3 text-base font-normal"
            inputMode="decimal"
            value={admins}
            onChange={(e) => setAdmins(e.target.value)}
          />
        </label>
      </div>
      <Button type="button" className="self-start" onClick={() => void save()}>
        Save
      </Button>
      {policy.updatedAt ? (
        <p className="text-sm text-muted">
          Changed by {policy.updatedBy ?? "someone"} on {new Date(policy.updatedAt).toLocaleString()}
        </p>
      ) : null}
      {message ? (
        <p role="status" className="text-sm">
          {message}
        </p>
      ) : null}
    </li>
  );
}

export function EscalationPolicyEditor({ initial }: { initial: PolicyDto[] }) {
  return (
    <ul className="flex flex-col gap-4">
      {initial.map((p) => (
        <PolicyRow key={p.priority} policy={p} />
      ))}
    </ul>
  );
}
