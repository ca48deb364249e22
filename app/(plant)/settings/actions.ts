"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { getDb } from "@/lib/server/runtime";
import { setUnitSystem } from "@/db/queries/users";
import { AppError } from "@/lib/errors";
import { runAction, type ActionState } from "@/lib/server/actions";
import { requirePageViewer } from "../../(auth)/auth";

const unitsSchema = z.object({ unitSystem: z.enum(["ip", "si"]) });

// Server actions are public endpoints: the viewer and the input are checked here too.
export async function saveUnitSystem(_previous: ActionState, formData: FormData): Promise<ActionState> {
  const viewer = await requirePageViewer();
  return runAction("saveUnitSystem", () => {
    const parsed = unitsSchema.safeParse({ unitSystem: formData.get("unitSystem") });
    if (!parsed.success) throw new AppError("bad_request", "Choose inch-pound or SI units.");
    setUnitSystem(getDb(), viewer, parsed.data.unitSystem);
    revalidatePath("/", "layout");
  });
}
