import { z } from "zod";

// Ingestion settings beyond lib/server/config.ts, validated the same way at start-up.
const schema = z.object({
  INGEST_FLUSH_MS: z.coerce.number().int().min(0).max(250).default(50),
  INGEST_MAX_BATCH_ROWS: z.coerce.number().int().min(100).max(50_000).default(5000),
  GATEWAY_MAX_MSGS_PER_S: z.coerce.number().int().min(1).default(500),
  ROLLUP_RETENTION_DAYS: z.coerce.number().int().min(1).max(36_500).default(730),
  LIVE_PUSH_MS: z.coerce.number().int().min(50).max(5000).default(200),
  MQTT_CLIENT_ID: z.string().min(1).max(23).default("liftline-ingest"),
  MQTT_USERNAME: z.string().min(1).optional(),
  MQTT_PASSWORD: z.string().min(1).optional(),
});

export type GatewayConfig = z.infer<typeof schema>;

export function loadGatewayConfig(env: NodeJS.ProcessEnv = process.env): GatewayConfig {
  const parsed = schema.safeParse(env);
  if (!parsed.success) {
    throw new Error(`Invalid configuration:\n${parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n")}`);
  }
  return parsed.data;
}
