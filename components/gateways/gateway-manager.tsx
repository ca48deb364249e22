"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import useSWR from "swr";
import { createGatewaySchema, type CreateGatewayBody } from "@/lib/schemas/gateways";
import type { GatewayDto } from "@/lib/dto/gateways";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { fetchJson } from "@/lib/client/fetcher";
import { formatDateTime } from "@/lib/client/format";

type Credentials = { username: string; password: string; gateway: GatewayDto };
type MapResult = { accepted: number; errors: Array<{ line: number; message: string }> };

/** In the site's time, as the rest of the product reads times. */
const when = (iso: string | null, timeZone: string) =>
  iso ? `${formatDateTime(Date.parse(iso), timeZone)} site time` : "never";

/** A site's gateways: provision, rotate, revoke, upload point maps, and read their counters. */
export function GatewayManager({ siteId, timeZone }: { siteId: string; timeZone: string }) {
  const { data, mutate } = useSWR<{ gateways: GatewayDto[] }>(
    `/api/gateways?site=${encodeURIComponent(siteId)}`,
    fetchJson,
    { refreshInterval: 5000 },
  );
  const [secret, setSecret] = useState<Credentials | null>(null);
  const [message, setMessage] = useState<string | null>(null);
  const [mapResult, setMapResult] = useState<{ gatewayId: string; result: MapResult } | null>(null);
  const form = useForm<CreateGatewayBody>({
    resolver: zodResolver(createGatewaySchema),
    defaultValues: { siteId, protocol: "json" },
  });
  const protocol = form.watch("protocol");

  async function act(fn: () => Promise<unknown>) {
    setMessage(null);
    try {
      await fn();
      await mutate();
    } catch (err) {
      setMessage((err as Error).message);
    }
  }

  async function upload(gatewayId: string, file: File) {
    setMessage(null);
    const res = await fetch(`/api/gateways/${gatewayId}/point-map`, {
      method: "PUT",
      headers: { "content-type": "text/csv" },
      body: await file.text(),
    });
    const body = await res.json().catch(() => null);
    if (body && "accepted" in body)
      setMapResult({ gatewayId, result: { accepted: body.accepted, errors: body.errors ?? [] } });
    else setMessage(body?.error?.message ?? `Upload failed (${res.status})`);
    await mutate();
  }

  return (
    <div className="flex flex-col gap-4">
      {secret ? (
        <div role="status" className="rounded-lg border border-advisory/40 bg-advisory/5 p-4 text-sm">
          <p className="font-semibold">
            MQTT credentials for {secret.gateway.name}. Copy the password now: it is not shown again.
          </p>
          <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1">
            <dt>User name</dt>
            <dd>
              <code data-testid="gw-username">{secret.username}</code>
            </dd>
            <dt>Password</dt>
            <dd>
              <code className="break-all" data-testid="gw-password">
                {secret.password}
              </code>
            </dd>
            <dt>Publish on</dt>
            <dd>
              <code>{secret.gateway.topics.publish.join(", ")}</code>
            </dd>
          </dl>
        </div>
      ) : null}
      {message ? (
        <p role="alert" className="text-alarm">
          {message}
        </p>
      ) : null}
      <ul className="flex flex-col gap-3">
        {(data?.gateways ?? []).map((g) => (
          <li key={g.id} className="rounded-lg border border-line bg-panel p-4" data-testid="gateway">
            <div className="flex flex-wrap items-baseline gap-x-3">
              <h3 className="font-semibold">{g.name}</h3>
              <code className="text-sm text-muted">{g.username}</code>
              <span className="text-sm text-muted">{g.protocol === "json" ? "Liftline JSON" : "Sparkplug B"}</span>
              <span
                className={`ml-auto rounded px-2 py-0.5 text-xs ${g.revokedAt ? "bg-stale text-on-strong" : g.status.online ? "bg-surface" : "bg-stale text-on-strong"}`}
              >
                {g.revokedAt ? "revoked" : g.status.online ? "online" : "offline"}
              </span>
            </div>
            <dl className="mt-2 grid grid-cols-2 gap-x-4 gap-y-1 text-sm sm:grid-cols-4">
              <div>
                <dt className="text-muted">Last message</dt>
                <dd>{when(g.status.lastMessageAt, timeZone)}</dd>
              </div>
              <div>
                <dt className="text-muted">Messages</dt>
                <dd className="tabular-nums">{g.counters.messages}</dd>
              </div>
              <div>
                <dt className="text-muted">Readings accepted</dt>
                <dd className="tabular-nums">{g.counters.readingsAccepted}</dd>
              </div>
              <div>
                <dt className="text-muted">Rejected</dt>
                <dd className="tabular-nums">{g.counters.rejectedTotal}</dd>
              </div>
            </dl>
            {g.counters.rejectedTotal ? (
              <p className="mt-1 text-sm text-muted">
                By reason:{" "}
                {Object.entries(g.counters.rejected)
                  .map(([k, v]) => `${k.replaceAll("_", " ")} ${v}`)
                  .join(" · ")}
              </p>
            ) : null}
            {g.unmapped.length ? (
              <details className="mt-2 text-sm">
                <summary className="cursor-pointer">{g.unmapped.length} point name(s) not in the point map</summary>
                <ul className="mt-1 font-mono text-xs">
                  {g.unmapped.map((u) => (
                    <li key={u.point}>
                      {u.point} — {u.count} reading(s), last {when(u.lastSeenAt, timeZone)}
                    </li>
                  ))}
                </ul>
              </details>
            ) : null}
            {!g.revokedAt ? (
              <div className="mt-3 flex flex-wrap items-center gap-2">
                <label className="inline-flex min-h-11 cursor-pointer items-center rounded border border-line px-4 text-sm font-semibold hover:bg-surface">
                  Upload point map (CSV, {g.pointMapSize} mapped)
                  <input
                    type="file"
                    accept=".csv,text/csv"
                    className="sr-only"
                    onChange={(e) => {
                      const f = e.target.files?.[0];
                      if (f) void upload(g.id, f);
                      e.target.value = "";
                    }}
                  />
                </label>
                <Button
                  variant="secondary"
                  onClick={() =>
                    act(async () =>
                      setSecret(await fetchJson<Credentials>(`/api/gateways/${g.id}/rotate`, { method: "POST" })),
                    )
                  }
                >
                  Rotate password
                </Button>
                <Button
                  variant="danger"
                  onClick={() => {
                    if (window.confirm(`Revoke ${g.name}? It is disconnected at once and cannot connect again.`))
                      void act(() => fetchJson(`/api/gateways/${g.id}/revoke`, { method: "POST" }));
                  }}
                >
                  Revoke
                </Button>
              </div>
            ) : null}
            {mapResult?.gatewayId === g.id ? (
              <div className="mt-2 text-sm" role="status">
                {mapResult.result.errors.length === 0 ? (
                  <p>Point map replaced: {mapResult.result.accepted} rows.</p>
                ) : (
                  <>
                    <p className="text-alarm">
                      Nothing was changed: {mapResult.result.errors.length} row(s) need fixing.
                    </p>
                    <ul className="mt-1 max-h-40 overflow-y-auto font-mono text-xs">
                      {mapResult.result.errors.map((e, i) => (
                        <li key={i}>
                          line {e.line}: {e.message}
                        </li>
                      ))}
                    </ul>
                  </>
                )}
              </div>
            ) : null}
          </li>
        ))}
        {data && data.gateways.length === 0 ? (
          <li className="text-muted">No gateway yet: provision one below.</li>
        ) : null}
      </ul>
      <form
        noValidate
        className="grid gap-3 rounded-lg border border-line bg-panel p-4 sm:grid-cols-2"
        onSubmit={form.handleSubmit((v) =>
          act(async () => {
            setSecret(await fetchJson<Credentials>("/api/gateways", { method: "POST", body: JSON.stringify(v) }));
            form.reset({ siteId, protocol: "json", name: "" });
          }),
        )}
      >
        <h3 className="font-semibold sm:col-span-2">Provision a gateway</h3>
        <Field id="gw-name" label="Name" error={form.formState.errors.name?.message} {...form.register("name")} />
        <label className="flex flex-col gap-1 text-sm font-semibold">
          Protocol
          <select
            className="min-h-11 rounded border border-line bg-panel px-2 font-normal"
            {...form.register("protocol")}
          >
            <option value="json">Liftline JSON</option>
            <option value="sparkplug">Sparkplug B 3.0</option>
          </select>
        </label>
        {protocol === "sparkplug" ? (
          <>
            <Field
              id="gw-group"
              label="Sparkplug group id"
              error={form.formState.errors.groupId?.message}
              {...form.register("groupId", { setValueAs: (v) => v || undefined })}
            />
            <Field
              id="gw-edge"
              label="Edge node id"
              error={form.formState.errors.edgeNodeId?.message}
              {...form.register("edgeNodeId", { setValueAs: (v) => v || undefined })}
            />
          </>
        ) : null}
        <div className="sm:col-span-2">
          <Button type="submit">Provision</Button>
        </div>
      </form>
    </div>
  );
}
