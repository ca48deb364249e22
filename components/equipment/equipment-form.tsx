"use client";

import { useRouter } from "next/navigation";
import { useRef, useState } from "react";
import { useForm, type FieldErrors, type Resolver } from "react-hook-form";
import { equipmentSchema } from "@/lib/schemas/equipment";
import {
  emptyEquipmentForm,
  equipmentFields,
  equipmentKindLabels,
  equipmentKinds,
  fieldUnit,
  formToBody,
  type EquipmentFormValues,
  type EquipmentKindName,
} from "@/lib/plant/equipment-form";
import type { UnitSystem } from "@/lib/units";
import { ApiError, fetchJson } from "@/lib/client/fetcher";
import type { EquipmentRecordDto } from "@/lib/dto/sites";
import { Button } from "@/components/ui/button";
import { Field } from "@/components/ui/field";
import { SelectField } from "@/components/ui/select-field";

/** Schema errors point at canonical names; an SI chiller form asks for kW where the schema says tons. */
function formField(path: string, kind: EquipmentKindName, system: UnitSystem): string {
  return kind === "chiller" && path === "capacityTons" && system === "si" ? "capacityKW" : path;
}

/** Checks the canonical body with the shared schema and puts each problem on the field the viewer typed in. */
function resolverFor(kindRef: { current: EquipmentKindName }, system: UnitSystem): Resolver<EquipmentFormValues> {
  return async (values) => {
    const kind = kindRef.current;
    const parsed = equipmentSchema.safeParse(formToBody(kind, values, system));
    if (parsed.success) return { values, errors: {} };
    const errors: FieldErrors<EquipmentFormValues> = {};
    for (const issue of parsed.error.issues) {
      const name = formField(String(issue.path[0] ?? "kind"), kind, system);
      errors[name] ??= { type: issue.code, message: issue.message };
    }
    return { values: {}, errors };
  };
}

/**
 * Adds a piece of equipment, or edits one: the fields follow the kind, numbers in the viewer's
 * unit system, stored in canonical SI.
 */
export function EquipmentForm({
  siteId,
  unitSystem,
  chillerTags,
  existing,
  initial,
}: {
  siteId: string;
  unitSystem: UnitSystem;
  /** Tags of the site's chillers in service, for what a pump or tower serves. */
  chillerTags: string[];
  existing?: { id: string; kind: EquipmentKindName };
  initial?: EquipmentFormValues;
}) {
  const router = useRouter();
  const [kind, setKind] = useState<EquipmentKindName>(existing?.kind ?? "chiller");
  const [message, setMessage] = useState<string | null>(null);
  // The resolver is read once by the form; it follows the kind chosen since through the ref.
  const kindRef = useRef(kind);
  kindRef.current = kind;
  const form = useForm<EquipmentFormValues>({
    resolver: resolverFor(kindRef, unitSystem),
    defaultValues: initial ?? emptyEquipmentForm(unitSystem),
  });
  const {
    register,
    handleSubmit,
    setError,
    reset,
    watch,
    formState: { errors, isSubmitting },
  } = form;
  const fanDrive = watch("fanDrive");
  const fields = equipmentFields(kind, unitSystem);

  async function onSubmit(values: EquipmentFormValues) {
    setMessage(null);
    try {
      if (existing) {
        // An edit names every field of the kind; an emptied optional field is cleared.
        const body = formToBody(kind, values, unitSystem, { clearEmpty: true });
        delete body.kind;
        await fetchJson(`/api/equipment/${encodeURIComponent(existing.id)}`, {
          method: "PATCH",
          body: JSON.stringify(body),
        });
        setMessage("Saved.");
      } else {
        const res = await fetchJson<{ equipment: EquipmentRecordDto }>(
          `/api/sites/${encodeURIComponent(siteId)}/equipment`,
          { method: "POST", body: JSON.stringify(formToBody(kind, values, unitSystem)) },
        );
        reset(emptyEquipmentForm(unitSystem));
        setMessage(`Added ${res.equipment.tag}.`);
      }
      router.refresh();
    } catch (err) {
      if (err instanceof ApiError && err.fieldErrors.length)
        for (const f of err.fieldErrors)
          setError(formField(f.path.split(".")[0], kind, unitSystem), { message: f.message });
      setMessage((err as Error).message);
    }
  }

  const idFor = (name: string) => `eq-${existing?.id ?? "new"}-${name}`;
  return (
    <form
      noValidate
      onSubmit={handleSubmit(onSubmit)}
      className="grid gap-3 rounded-lg border border-line bg-panel p-4 sm:grid-cols-2"
      aria-label={existing ? "Edit equipment" : "Add equipment"}
    >
      {existing ? null : (
        <label className="flex flex-col gap-1 text-sm font-semibold sm:col-span-2">
          Kind of equipment
          <select
            className="min-h-11 rounded border border-line bg-panel px-3 text-base font-normal"
            value={kind}
            onChange={(e) => {
              setKind(e.target.value as EquipmentKindName);
              form.clearErrors();
            }}
          >
            {equipmentKinds.map((k) => (
              <option key={k} value={k}>
                {equipmentKindLabels[k]}
              </option>
            ))}
          </select>
        </label>
      )}
      <Field
        id={idFor("tag")}
        label="Tag"
        placeholder="e.g. CH-1"
        autoCapitalize="characters"
        error={errors.tag?.message}
        {...register("tag")}
      />
      <Field id={idFor("name")} label="Name" error={errors.name?.message} {...register("name")} />
      {fields.map((f) => {
        const error = errors[f.name]?.message;
        if (f.type === "serves")
          return (
            <SelectField key={f.name} id={idFor(f.name)} label={f.label} error={error} {...register("serves")}>
              <option value="">Common header (all chillers)</option>
              {chillerTags.map((t) => (
                <option key={t} value={t}>
                  {t}
                </option>
              ))}
            </SelectField>
          );
        if (f.type === "select")
          return (
            <SelectField key={f.name} id={idFor(f.name)} label={f.label} error={error} {...register(f.name)}>
              <option value="">Choose…</option>
              {f.options.map((o) => (
                <option key={o.value} value={o.value}>
                  {o.label}
                </option>
              ))}
            </SelectField>
          );
        if (f.name === "fanMinSpeedPct" && fanDrive !== "variable_speed") return null;
        const unit = fieldUnit(f, unitSystem);
        return (
          <Field
            key={f.name}
            id={idFor(f.name)}
            label={`${f.label}${unit ? ` (${unit})` : ""}${f.type === "number" && !f.required ? ", optional" : ""}`}
            inputMode={f.type === "number" ? "decimal" : undefined}
            placeholder={f.type === "text" ? f.hint : undefined}
            error={error}
            {...register(f.name)}
          />
        );
      })}
      <div className="flex flex-wrap items-center gap-3 sm:col-span-2">
        <Button type="submit" disabled={isSubmitting}>
          {existing ? "Save equipment" : `Add ${equipmentKindLabels[kind].toLowerCase()}`}
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
