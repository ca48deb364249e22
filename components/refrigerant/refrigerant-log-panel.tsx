"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { useForm } from "react-hook-form";
import useSWR from "swr";
import { Button } from "@/components/ui/button";
import { fetchJson } from "@/lib/client/fetcher";
import type { RefrigerantEntryDto, RefrigerantLogDto } from "@/lib/dto/refrigerant";
import { KG_PER_LB, refrigerantEntryKinds, type RefrigerantEntryKind } from "@/lib/refrigerant-log";
import { refrigerantEntrySchema, type RefrigerantEntryInput } from "@/lib/schemas/refrigerant";
import type { UnitSystem } from "@/lib/units";

const kindLabels: Record<RefrigerantEntryKind, string> = {
  added: "Added",
  recovered: "Recovered",
  leak_check: "Leak check",
  full_charge: "Full charge",
  correction: "Correction",
};

const resultLabels: Record<string, string> = { no_leak: "No leak found", leak_found: "Leak found" };

function massText(kg: number | null, unitSystem: UnitSystem, signed = false): string {
  if (kg === null) return "—";
  const value = unitSystem === "ip" ? kg / KG_PER_LB : kg;
  const text = value.toFixed(unitSystem === "ip" ? 1 : 2);
  return `${signed && value > 0 ? "+" : ""}${text} ${unitSystem === "ip" ? "lb" : "kg"}`;
}

const pct = (v: number | null) => (v === null ? "—" : `${v.toFixed(1)} %/yr`);

const emptyToUndefined = (v: unknown) => (v === "" || v === null ? undefined : v);

/** A chiller's refrigerant log: the figures, the entries, and (staff) a form to append one. */
export function RefrigerantLogPanel({
  initial,
  canAct,
  unitSystem,
}: {
  initial: RefrigerantLogDto;
  canAct: boolean;
  unitSystem: UnitSystem;
}) {
  const url = `/api/equipment/${encodeURIComponent(initial.equipment.id)}/refrigerant`;
  const { data, mutate } = useSWR<RefrigerantLogDto>(url, fetchJson, { fallbackData: initial });
  const log = data ?? initial;
  const s = log.summary;
  const unit = unitSystem === "ip" ? "lb" : "kg";
  const toKg = (v: unknown) => {
    if (v === "" || v === undefined || v === null) return undefined;
    const n = Number(v);
    return unitSystem === "ip" ? n * KG_PER_LB : n;
  };
  const form = useForm<RefrigerantEntryInput>({
    resolver: zodResolver(refrigerantEntrySchema),
    defaultValues: { kind: "added" },
    // Fields a kind does not show (a leak check has no amount) must not be sent with it.
    shouldUnregister: true,
  });
  const kind = form.watch("kind");
  const [error, setError] = useState<string | null>(null);
  const [formKey, setFormKey] = useState(0);
  const errors = form.formState.errors;

  const onSubmit = form.handleSubmit(async (values) => {
    setError(null);
    try {
      await fetchJson(url, { method: "POST", body: JSON.stringify(values) });
      form.reset({ kind: values.kind });
      // A fresh set of inputs: an old date or amount left in a field would go into the next entry unseen.
      setFormKey((k) => k + 1);
      await mutate();
    } catch (err) {
      setError((err as Error).message);
    }
  });

  const correctable = log.entries.filter((e) => ["added", "recovered", "full_charge"].includes(e.kind));
  const latest = s.additions.at(-1);

  return (
    <div className="flex flex-col gap-6">
      <dl className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-3" data-testid="refrigerant-summary">
        <div className="rounded-lg border border-line bg-panel p-3">
          <dt className="text-sm text-muted">Full charge</dt>
          <dd className="text-lg font-semibold">{massText(s.fullChargeKg, unitSystem)}</dd>
          <dd className="text-xs text-muted">
            {s.fullChargeSource === "equipment_record"
              ? "From the chiller's record"
              : s.fullChargeSource === "full_charge_entry"
                ? "From the latest full-charge entry"
                : "Unknown: record a full charge or enter it in the chiller's record"}
          </dd>
        </div>
        <div className="rounded-lg border border-line bg-panel p-3">
          <dt className="text-sm text-muted">Charged since the last full charge</dt>
          <dd className="text-lg font-semibold">{massText(s.chargedSinceFullChargeKg, unitSystem)}</dd>
          <dd className="text-xs text-muted">Recovered: {massText(s.recoveredSinceFullChargeKg, unitSystem)}</dd>
        </div>
        <div className="rounded-lg border border-line bg-panel p-3">
          <dt className="text-sm text-muted">Annual leak rate (annualizing method)</dt>
          <dd
            className={`text-lg font-semibold ${s.latestLeakRatePct !== null && s.latestLeakRatePct > s.leakRateLimitPct ? "text-alarm" : ""}`}
          >
            {pct(s.latestLeakRatePct)}
          </dd>
          <dd className="text-xs text-muted">
            {latest
              ? `At the latest addition, ${latest.daysSincePrevious ?? "365 (no earlier charge on record)"} days after the previous charge. Rolling average over 365 days: ${pct(s.rollingLeakRatePct)}.`
              : "No refrigerant added yet."}
          </dd>
        </div>
      </dl>
      <p className="max-w-prose text-xs text-muted">
        Leak rate = (added ÷ full charge) × (365 ÷ the shorter of the days since the last addition and 365) × 100, the
        annualizing method of US EPA 40 CFR §82.152/§82.157; the rolling average method (added over the past 365 days ÷
        full charge) is shown beside it. The comfort-cooling trigger of {s.leakRateLimitPct} %/yr applies to appliances
        with 50 lb or more of ozone-depleting refrigerant (recalled, not verified). Which rule applies to this chiller
        is for the owner, the manufacturer&apos;s procedures and local codes to settle; refrigerant is handled only by
        certified technicians.
      </p>

      {canAct ? (
        <form
          key={formKey}
          onSubmit={onSubmit}
          className="flex flex-col gap-3 rounded-lg border border-line bg-panel p-3"
          noValidate
        >
          <h2 className="text-lg font-semibold">Add an entry</h2>
          <div className="grid grid-cols-1 gap-3 sm:grid-cols-2">
            <div className="flex flex-col gap-1">
              <label htmlFor="rl-kind" className="text-sm font-semibold">
                What
              </label>
              <select
                id="rl-kind"
                className="min-h-11 rounded border border-line bg-panel px-3"
                {...form.register("kind")}
              >
                {refrigerantEntryKinds.map((k) => (
                  <option key={k} value={k}>
                    {kindLabels[k]}
                  </option>
                ))}
              </select>
            </div>
            {kind !== "leak_check" ? (
              <div className="flex flex-col gap-1">
                <label htmlFor="rl-amount" className="text-sm font-semibold">
                  {kind === "correction" ? `Change to the amount (${unit}, + or −)` : `Amount (${unit})`}
                </label>
                <input
                  id="rl-amount"
                  type="number"
                  step="any"
                  inputMode="decimal"
                  className="min-h-11 rounded border border-line bg-panel px-3 text-base"
                  {...form.register("amountKg", { setValueAs: toKg })}
                />
                {errors.amountKg ? <p className="text-sm text-alarm">{errors.amountKg.message}</p> : null}
              </div>
            ) : (
              <div className="flex flex-col gap-1">
                <label htmlFor="rl-result" className="text-sm font-semibold">
                  Result
                </label>
                <select
                  id="rl-result"
                  className="min-h-11 rounded border border-line bg-panel px-3"
                  {...form.register("result", { setValueAs: emptyToUndefined })}
                >
                  <option value="">Choose…</option>
                  <option value="no_leak">No leak found</option>
                  <option value="leak_found">Leak found</option>
                </select>
                {errors.result ? <p className="text-sm text-alarm">{errors.result.message}</p> : null}
              </div>
            )}
            {kind === "correction" ? (
              <div className="flex flex-col gap-1">
                <label htmlFor="rl-corrects" className="text-sm font-semibold">
                  Corrects entry
                </label>
                <select
                  id="rl-corrects"
                  className="min-h-11 rounded border border-line bg-panel px-3"
                  {...form.register("correctsId", { setValueAs: (v) => (v ? Number(v) : undefined) })}
                >
                  <option value="">Choose…</option>
                  {correctable.map((e) => (
                    <option key={e.id} value={e.id}>
                      #{e.id} {kindLabels[e.kind]} {massText(e.amountKg, unitSystem)} ·{" "}
                      {new Date(e.at).toLocaleDateString()}
                    </option>
                  ))}
                </select>
                {errors.correctsId ? <p className="text-sm text-alarm">{errors.correctsId.message}</p> : null}
              </div>
            ) : null}
            {kind === "added" || kind === "recovered" || kind === "full_charge" ? (
              <div className="flex flex-col gap-1">
                <label htmlFor="rl-cylinder" className="text-sm font-semibold">
                  Cylinder (optional)
                </label>
                <input
                  id="rl-cylinder"
                  className="min-h-11 rounded border border-line bg-panel px-3 text-base"
                  {...form.register("cylinder", { setValueAs: emptyToUndefined })}
                />
              </div>
            ) : null}
            <div className="flex flex-col gap-1">
              <label htmlFor="rl-at" className="text-sm font-semibold">
                When (empty: now)
              </label>
              <input
                id="rl-at"
                type="datetime-local"
                className="min-h-11 rounded border border-line bg-panel px-3 text-base"
                {...form.register("at", { setValueAs: (v) => (v ? new Date(v).toISOString() : undefined) })}
              />
              {errors.at ? <p className="text-sm text-alarm">{errors.at.message}</p> : null}
            </div>
          </div>
          <div className="flex flex-col gap-1">
            <label htmlFor="rl-reason" className="text-sm font-semibold">
              {kind === "leak_check" ? "Where and how it was checked" : "Reason"}
            </label>
            <input
              id="rl-reason"
              className="min-h-11 rounded border border-line bg-panel px-3 text-base"
              {...form.register("reason")}
            />
            {errors.reason ? <p className="text-sm text-alarm">{errors.reason.message}</p> : null}
          </div>
          {error ? (
            <p role="alert" className="text-sm text-alarm">
              {error}
            </p>
          ) : null}
          <Button type="submit" disabled={form.formState.isSubmitting}>
            Add to the log
          </Button>
        </form>
      ) : null}

      <div tabIndex={0} role="region" aria-label="Refrigerant log entries" className="overflow-x-auto">
        <table className="w-full min-w-[40rem] text-left text-sm" data-testid="refrigerant-entries">
          <caption className="sr-only">Entries, oldest first; entries are never edited, corrections are added</caption>
          <thead>
            <tr className="border-b border-line">
              <th className="p-2">#</th>
              <th className="p-2">When</th>
              <th className="p-2">What</th>
              <th className="p-2">Amount</th>
              <th className="p-2">Cylinder</th>
              <th className="p-2">Reason / result</th>
              <th className="p-2">By</th>
            </tr>
          </thead>
          <tbody>
            {log.entries.length === 0 ? (
              <tr>
                <td colSpan={7} className="p-2 text-muted">
                  No entries yet.
                </td>
              </tr>
            ) : null}
            {log.entries.map((e) => (
              <EntryRow key={e.id} entry={e} unitSystem={unitSystem} corrected={s.correctedAmountKg[e.id]} />
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

function EntryRow({
  entry: e,
  unitSystem,
  corrected,
}: {
  entry: RefrigerantEntryDto;
  unitSystem: UnitSystem;
  corrected: number | undefined;
}) {
  const wasCorrected = corrected !== undefined && e.amountKg !== null && Math.abs(corrected - e.amountKg) > 1e-9;
  return (
    <tr className="border-b border-line align-top" data-testid="refrigerant-entry">
      <td className="p-2">{e.id}</td>
      <td className="p-2 whitespace-nowrap">{new Date(e.at).toLocaleString()}</td>
      <td className="p-2">
        {kindLabels[e.kind]}
        {e.correctsId ? ` of #${e.correctsId}` : ""}
      </td>
      <td className="p-2 whitespace-nowrap">
        {massText(e.amountKg, unitSystem, e.kind === "correction")}
        {wasCorrected ? <span className="block text-xs text-muted">now {massText(corrected, unitSystem)}</span> : null}
      </td>
      <td className="p-2">{e.cylinder ?? "—"}</td>
      <td className="p-2">
        {e.result ? <span className="block font-semibold">{resultLabels[e.result] ?? e.result}</span> : null}
        {e.reason}
      </td>
      <td className="p-2">{e.by.name}</td>
    </tr>
  );
}
