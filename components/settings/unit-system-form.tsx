"use client";

import { useActionState } from "react";
import { Button } from "@/components/ui/button";
import type { ActionState } from "@/lib/dto/action-state";
import type { UnitSystem } from "@/lib/units";

export function UnitSystemForm({
  unitSystem,
  save,
}: {
  unitSystem: UnitSystem;
  save: (previous: ActionState, formData: FormData) => Promise<ActionState>;
}) {
  const [state, action, pending] = useActionState(save, { status: "idle" });
  return (
    <form action={action} className="flex flex-col gap-3 rounded-lg border border-line bg-panel p-4">
      <fieldset className="flex flex-col gap-2">
        <legend className="font-semibold">Units</legend>
        <label className="flex min-h-11 items-center gap-2">
          <input type="radio" name="unitSystem" value="ip" defaultChecked={unitSystem === "ip"} /> Inch-pound (°F, psig,
          gpm)
        </label>
        <label className="flex min-h-11 items-center gap-2">
          <input type="radio" name="unitSystem" value="si" defaultChecked={unitSystem === "si"} /> SI (°C, kPa absolute,
          L/s)
        </label>
      </fieldset>
      <Button type="submit" className="self-start" disabled={pending}>
        Save
      </Button>
      {state.status === "error" ? (
        <p role="alert" className="text-sm text-alarm">
          {state.message}
        </p>
      ) : state.status === "saved" ? (
        <p role="status" className="text-sm text-muted">
          Saved.
        </p>
      ) : null}
    </form>
  );
}
