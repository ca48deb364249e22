import { AppError } from "@/lib/errors";
import { getRuntime } from "./runtime";

/** The drill service, or a 503 in a process started without the embedded broker. */
export function requireDrills() {
  const drills = getRuntime()?.drills;
  if (!drills) throw new AppError("unavailable", "Drills need the embedded MQTT broker (MQTT_URL is set).");
  return drills;
}
