"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import useSWR from "swr";
import { createTokenSchema, tokenLifetimesDays, type CreateTokenInput } from "@/lib/schemas/tokens";
import { scopeAllows, tokenScopes, type TokenScope } from "@/lib/auth/viewer";
import type { ApiTokenDto } from "@/lib/dto/tokens";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { fetchJson } from "@/lib/client/fetcher";

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString() : "never");
const expired = (iso: string | null) => iso !== null && Date.parse(iso) <= Date.now();

const scopeText: Record<TokenScope, string> = {
  read: "read — only reads",
  act: "act — reads, acts on alarms and plants",
  admin: "admin — everything you can do",
};

/** `maxScope`: the widest scope the signed-in person's role allows. */
export function TokenManager({ maxScope }: { maxScope: TokenScope }) {
  const { data, mutate, error } = useSWR<{ tokens: ApiTokenDto[] }>("/api/tokens", fetchJson);
  const [created, setCreated] = useState<string | null>(null);
  const [actionError, setActionError] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    reset,
    formState: { errors, isSubmitting },
  } = useForm<CreateTokenInput>({ resolver: zodResolver(createTokenSchema), defaultValues: { scope: "read" } });

  async function onCreate(values: CreateTokenInput) {
    setActionError(null);
    try {
      const res = await fetchJson<{ token: string }>("/api/tokens", { method: "POST", body: JSON.stringify(values) });
      setCreated(res.token);
      reset({ scope: "read" });
      await mutate();
    } catch (err) {
      setActionError((err as Error).message);
    }
  }

  async function onRevoke(id: string) {
    setActionError(null);
    try {
      await fetchJson(`/api/tokens/${id}`, { method: "DELETE" });
      await mutate();
    } catch (err) {
      setActionError((err as Error).message);
    }
  }

  return (
    <div className="flex flex-col gap-6">
      <form
        onSubmit={handleSubmit(onCreate)}
        noValidate
        className="flex flex-col gap-3 rounded-lg border border-line bg-panel p-4 sm:flex-row sm:items-end"
      >
        <div className="grow">
          <Field
            id="token-name"
            label="New token name"
            placeholder="e.g. reporting script"
            error={errors.name?.message}
            {...register("name")}
          />
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="token-expiry" className="text-sm font-semibold">
            Expires
          </label>
          <select
            id="token-expiry"
            className="min-h-11 rounded border border-line bg-panel px-3 text-base"
            {...register("expiresInDays", { setValueAs: (v: string) => (v === "" ? undefined : Number(v)) })}
          >
            <option value="">Never</option>
            {tokenLifetimesDays.map((d) => (
              <option key={d} value={d}>
                in {d} days
              </option>
            ))}
          </select>
          {errors.expiresInDays ? <p className="text-sm text-alarm">{errors.expiresInDays.message}</p> : null}
        </div>
        <div className="flex flex-col gap-1">
          <label htmlFor="token-scope" className="text-sm font-semibold">
            Scope
          </label>
          <select
            id="token-scope"
            className="min-h-11 rounded border border-line bg-panel px-3 text-base"
            {...register("scope")}
          >
            {tokenScopes
              .filter((s) => scopeAllows(maxScope, s))
              .map((s) => (
                <option key={s} value={s}>
                  {scopeText[s]}
                </option>
              ))}
          </select>
        </div>
        <Button type="submit" disabled={isSubmitting}>
          Create token
        </Button>
      </form>
      {created ? (
        <div role="status" className="rounded-lg border border-advisory/40 bg-advisory/5 p-4">
          <p className="text-sm font-semibold">Copy this token now. It will not be shown again.</p>
          <code className="mt-2 block break-all rounded bg-panel p-2 text-sm" data-testid="new-token">
            {created}
          </code>
        </div>
      ) : null}
      {actionError || error ? <p className="text-alarm">{actionError ?? error?.message}</p> : null}
      <ul className="flex flex-col gap-2">
        {(data?.tokens ?? []).map((t) => (
          <li
            key={t.id}
            className="flex flex-wrap items-center gap-x-4 gap-y-1 rounded-lg border border-line bg-panel px-4 py-3"
          >
            <span className="font-semibold">{t.name}</span>
            <code className="text-sm text-muted">{t.prefix}…</code>
            <span className="rounded bg-surface px-2 py-0.5 text-xs font-semibold" data-testid="token-scope">
              {t.scope}
            </span>
            <span className="text-sm text-muted">
              created {when(t.createdAt)} · last used {when(t.lastUsedAt)} ·{" "}
              {t.expiresAt ? `${expired(t.expiresAt) ? "expired" : "expires"} ${when(t.expiresAt)}` : "does not expire"}
            </span>
            {t.revokedAt ? (
              <span className="ml-auto text-sm text-muted">revoked {when(t.revokedAt)}</span>
            ) : expired(t.expiresAt) ? (
              <span className="ml-auto text-sm text-muted">expired</span>
            ) : (
              <Button variant="danger" className="ml-auto" onClick={() => onRevoke(t.id)}>
                Revoke
              </Button>
            )}
          </li>
        ))}
        {data && data.tokens.length === 0 ? <li className="text-muted">No tokens yet.</li> : null}
      </ul>
    </div>
  );
}
