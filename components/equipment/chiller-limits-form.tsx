"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { useForm, type FieldErrors, type Resolver } from "react-hook-form";
import { chillerLimitKeys, chillerLimitLabels, type ChillerLimitKey } from "@/lib/plant/equipment-limits";
import { limitMeasures, recordFromDisplay, recordToDisplay, recordUnitLabel } from "@/lib/plant/record-units";
import { chillerLimitsSchema } from "@/lib/schemas/equipment";
import type { ChillerLimitDto } from "@/lib/dto/sites";
import type { UnitSystem } from "@/lib/units";
import { ApiError, fetchJson } from "@/lib/client/fetcher";
import { formatDateTime } from "@/lib/client/format";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";

type LimitValues = Record<ChillerLimitKey, string>;

const measureOf = (key: ChillerLimitKey) => limitMeasures[chillerLimitLabels[key].measure];
/** Anti-recycle times and starts per hour, shown together under their caution. */
const isTimer = (key: ChillerLimitKey) => ["duration", "count"].includes(chillerLimitLabels[key].measure);

/**
 * The values that changed from what is shown, in canonical units. A default left as it is stays
 * a default: only a typed change enters a value.
 */
function changedValues(values: LimitValues, shown: LimitValues, system: UnitSystem) {
  const out: Partial<Record<ChillerLimitKey, number | string>> = {};
  for (const key of chillerLimitKeys) {
    const raw = values[key].trim();
    if (raw === shown[key]) continue;
    const n = Number(raw);
    out[key] = raw !== "" && Number.isFinite(n) ? recordFromDisplay(n, measureOf(key), system) : raw;
  }
  return out;
}

function resolverFor(shown: LimitValues, system: UnitSystem): Resolver<LimitValues> {
  return async (values) => {
    const parsed = chillerLimitsSchema.safeParse({ values: changedValues(values, shown, system) });
    if (parsed.success) return { values, errors: {} };
    const errors: FieldErrors<LimitValues> = {};
    for (const issue of parsed.error.issues) {
      const key = issue.path[1] as ChillerLimitKey | undefined;
      if (key) errors[key] ??= { type: issue.code, message: issue.message };
    }
    return { values: {}, errors };
  };
}

/**
 * A chiller's controller limits: each value in the viewer's units, marked as a default with its
 * basis until someone enters the nameplate or controller value, with who entered it and when.
 */
export function ChillerLimitsForm({
  equipmentId,
  limits,
  unitSystem,
  timeZone,
}: {
  equipmentId: string;
  limits: Record<string, ChillerLimitDto>;
  unitSystem: UnitSystem;
  timeZone: string;
}) {
  const router = useRouter();
  const [message, setMessage] = useState<string | null>(null);
  const shown = Object.fromEntries(
    chillerLimitKeys.map((k) => [k, String(recordToDisplay(limits[k].value, measureOf(k), unitSystem))]),
  ) as LimitValues;
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<LimitValues>({ resolver: resolverFor(shown, unitSystem), values: shown });

  async function put(values: Partial<Record<ChillerLimitKey, number | string | null>>) {
    setMessage(null);
    try {
      const res = await fetchJson<{ changed: string[] }>(`/api/equipment/${encodeURIComponent(equipmentId)}/limits`, {
        method: "PUT",
        body: JSON.stringify({ values }),
      });
      setMessage(res.changed.length ? `Saved ${res.changed.length} limit(s).` : "Nothing changed.");
      router.refresh();
    } catch (err) {
      if (err instanceof ApiError)
        for (const f of err.fieldErrors) {
          const key = f.path.split(".")[1] as ChillerLimitKey | undefined;
          if (key && chillerLimitKeys.includes(key)) setError(key, { message: f.message });
        }
      setMessage((err as Error).message);
    }
  }

  const row = (key: ChillerLimitKey) => {
    const limit = limits[key];
    const unit = recordUnitLabel(measureOf(key), unitSystem);
    return (
      <li key={key} className="flex flex-col gap-1 border-t border-line/60 py-3 first:border-t-0" data-limit={key}>
        <Field
          id={`limit-${key}`}
          label={`${chillerLimitLabels[key].label}${unit ? ` (${unit})` : ""}`}
          inputMode="decimal"
          error={errors[key]?.message}
          {...register(key)}
        />
        <div className="flex flex-wrap items-center gap-2 text-sm">
          {limit.source === "default" ? (
            <>
              <span className="rounded bg-advisory/15 px-2 py-0.5 text-xs font-semibold">default</span>
              <span className="text-muted">{limit.basis}</span>
            </>
          ) : (
            <>
              <span className="rounded bg-ink px-2 py-0.5 text-xs font-semibold text-on-strong">entered</span>
              <span className="text-muted">
                by {limit.setByName ?? "the system"} on {formatDateTime(limit.setAtMs, timeZone)} (site time)
              </span>
              <Button variant="secondary" type="button" className="min-h-9" onClick={() => put({ [key]: null })}>
                Back to default
              </Button>
            </>
          )}
        </div>
      </li>
    );
  };

  const protections = chillerLimitKeys.filter((k) => !isTimer(k));
  const timers = chillerLimitKeys.filter(isTimer);
  return (
    <form
      noValidate
      aria-label="Chiller limits"
      onSubmit={handleSubmit((values) => put(changedValues(values, shown, unitSystem)))}
      className="flex flex-col gap-3 rounded-lg border border-line bg-panel p-4"
    >
      <p className="text-sm text-muted">
        Enter the values set in this chiller&apos;s controller or on its nameplate. Until then each limit is a default
        from its refrigerant and compressor type. The rules use a change from the next reading on.
      </p>
      <h3 className="font-semibold">Safeties</h3>
      <ul>{protections.map(row)}</ul>
      <h3 className="font-semibold">Anti-recycle timers</h3>
      <div role="note" className="rounded border border-advisory/50 bg-advisory/10 p-3 text-sm">
        <p className="font-semibold">Caution</p>
        <p>
          These values describe the chiller&apos;s controller; changing them here does not change the controller. Change
          anti-recycle timers, cut-outs and trips on the chiller only within the manufacturer&apos;s limits and under
          the supervision of a qualified technician. Follow the manufacturer&apos;s procedures, local codes and licensed
          practice; shortening a timer can overheat the motor or drive.
        </p>
      </div>
      <ul>{timers.map(row)}</ul>
      <div className="flex flex-wrap items-center gap-3">
        <Button type="submit" disabled={isSubmitting}>
          Save limits
        </Button>
        {message ? (
          <p role="status" className="text-sm">
            {message}
          </p>
        ) : null}
      </div>
    </form>
  );
}
