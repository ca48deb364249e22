// Starts Liftline: reads the configuration, starts every part on one HTTP port and one MQTT
// port (lib/server/liftline.ts), and stops cleanly on SIGINT or SIGTERM.
import { loadConfig } from "./lib/server/config";
import { startLiftline } from "./lib/server/liftline";

// startLiftline has stopped whatever it started before a failure; only the reason is left to say.
const liftline = await (async () => startLiftline({ config: loadConfig() }))().catch((err: unknown) => {
  console.error(`Liftline could not start: ${err instanceof Error ? err.message : err}`);
  process.exit(1);
});
// A parent that started this process with an IPC channel (the test helper) learns the ports here.
process.send?.({ type: "ready", url: liftline.url, httpPort: liftline.httpPort, mqttPort: liftline.mqttPort });

let stopping = false;
async function shutdown(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`${signal}: shutting down`);
  setTimeout(() => process.exit(1), 10_000).unref();
  try {
    await liftline.close();
  } finally {
    process.exit(0);
  }
}
process.on("SIGINT", () => void shutdown("SIGINT"));
process.on("SIGTERM", () => void shutdown("SIGTERM"));
