"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { getDb } from "@/lib/server/runtime";
import { setUnitSystem } from "@/db/queries/users";
import { requirePageViewer } from "../../(auth)/auth";

const unitsSchema = z.object({ unitSystem: z.enum(["ip", "si"]) });

// Server actions are public endpoints: the viewer and the input are checked here too.
export async function saveUnitSystem(formData: FormData): Promise<void> {
  const viewer = await requirePageViewer();
  const parsed = unitsSchema.safeParse({ unitSystem: formData.get("unitSystem") });
  if (!parsed.success) return;
  setUnitSystem(getDb(), viewer, parsed.data.unitSystem);
  revalidatePath("/", "layout");
}
