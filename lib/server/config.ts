import { z } from "zod";
import { parseTrustedProxy } from "@/lib/auth/client-address";
import { DEFAULT_DEMO_PASSWORD } from "@/lib/auth/password-policy";

// Every setting the server reads, validated once at start-up so a typo fails loudly
// instead of surfacing as a strange runtime error later.
const flag = (fallback: boolean) =>
  z
    .enum(["0", "1", "true", "false", "yes", "no", "on", "off"])
    .optional()
    .transform((v) => (v === undefined ? fallback : ["1", "true", "yes", "on"].includes(v)));

const port = (fallback: number) => z.coerce.number().int().min(0).max(65535).default(fallback);

const ms = (fallback: number) => z.coerce.number().int().min(100).max(3_600_000).default(fallback);

/** A comma-separated list of http(s) URLs, kept as their origins (scheme, host and port). */
const originList = z
  .string()
  .default("")
  .transform((v) =>
    v
      .split(",")
      .map((s) => s.trim())
      .filter(Boolean),
  )
  .pipe(z.array(z.url({ protocol: /^https?$/ }).transform((u) => new URL(u).origin)));

export const configSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("production"),
  HOST: z.string().min(1).default("0.0.0.0"),
  PORT: port(3000),
  MQTT_PORT: port(1883),
  MQTT_URL: z.url({ protocol: /^mqtts?$/ }).optional(),
  DATABASE_PATH: z.string().min(1).default("data/liftline.db"),
  AUTH_SECRET: z.string().min(32, "AUTH_SECRET must be at least 32 characters").optional(),
  NEXTAUTH_URL: z.url().optional(),
  LIFTLINE_DEMO: flag(true),
  LIFTLINE_DEMO_PASSWORD: z
    .string()
    .min(8, "LIFTLINE_DEMO_PASSWORD must be at least 8 characters")
    .default(DEFAULT_DEMO_PASSWORD),
  LIFTLINE_SIMULATOR: flag(true),
  LIFTLINE_BUILD_IF_NEEDED: flag(true),
  SMTP_URL: z.url({ protocol: /^smtps?$/ }).optional(),
  /** The local SMTP sink's port when SMTP_URL is unset; 0 picks a free one. */
  SMTP_PORT: port(0),
  /** Temporary changes past their put-back-by time: remind again this often until put back. */
  CHANGE_REMINDER_EVERY_MIN: z.coerce.number().min(0.01).max(1440).default(30),
  /** Reminders to the on-call primary alone before the backup, then the admins, hear too. */
  CHANGE_REMINDER_ESCALATE_AFTER: z.coerce.number().int().min(0).max(100).default(2),
  /** How often the server looks for overdue temporary changes. */
  CHANGE_REMINDER_TICK_MS: z.coerce.number().int().min(100).max(3_600_000).default(60_000),
  /** The application server's Web Push key pair (RFC 8292); generated into the data folder when unset. */
  VAPID_PUBLIC_KEY: z
    .string()
    .regex(/^[A-Za-z0-9_-]{80,90}$/, "VAPID_PUBLIC_KEY: base64url P-256 public key")
    .optional(),
  VAPID_PRIVATE_KEY: z
    .string()
    .regex(/^[A-Za-z0-9_-]{40,45}$/, "VAPID_PRIVATE_KEY: base64url P-256 private key")
    .optional(),
  /** The contact push services may use (RFC 8292 §2.1). */
  VAPID_SUBJECT: z
    .string()
    .regex(/^(mailto:|https:)/, "VAPID_SUBJECT: a mailto: or https: URI")
    .default("mailto:alerts@liftline.invalid"),
  /** The local fake push service's port; 0 picks a free one. */
  PUSH_SINK_PORT: port(0),
  /** The SMS provider's API key; without it the local fake SMS API takes the texts. */
  SMS_API_KEY: z.string().min(1).optional(),
  /** The SMS provider's API base URL (its SDK's default when unset). */
  SMS_API_URL: z.url({ protocol: /^https?$/ }).optional(),
  /** The number texts come from (E.164). */
  SMS_FROM: z
    .string()
    .regex(/^\+[1-9]\d{6,14}$/, "SMS_FROM: an E.164 number")
    .default("+15555550100"),
  /** The provider's base64 Ed25519 key that signs inbound-message webhooks. */
  SMS_WEBHOOK_PUBLIC_KEY: z.string().min(40).optional(),
  /** The local fake SMS API's port; 0 picks a free one. */
  SMS_SINK_PORT: port(0),
  MAIL_FROM: z.string().default("Liftline <alerts@liftline.invalid>"),
  /** Failed sign-ins are forgotten this long after the last one; also the longest an account is slowed. */
  SIGNIN_WINDOW_S: z.coerce.number().int().min(1).default(900),
  /** Failures an account may make before each further attempt waits. */
  SIGNIN_MAX_PER_ACCOUNT: z.coerce.number().int().min(1).default(5),
  /** The first wait of a slowed account; it doubles with every further failure. */
  SIGNIN_BASE_DELAY_S: z.coerce.number().int().min(1).max(3600).default(30),
  /** Failed or refused sign-ins from one address in a window before that address is slowed (never locked). */
  SIGNIN_MAX_PER_ADDRESS: z.coerce.number().int().min(1).default(100),
  /** The pause before each sign-in from a slowed address is checked. */
  SIGNIN_ADDRESS_DELAY_MS: z.coerce.number().int().min(0).max(10_000).default(1000),
  /** How long an e-mailed invitation link works (72 h), and a password-reset link (1 h: OWASP Forgot Password Cheat Sheet). */
  INVITE_LINK_TTL_S: z.coerce
    .number()
    .int()
    .min(1)
    .max(30 * 86_400)
    .default(72 * 3600),
  RESET_LINK_TTL_S: z.coerce.number().int().min(1).max(86_400).default(3600),
  /** Password-reset requests per hour for one typed address, and from one client address. */
  PASSWORD_RESET_PER_HOUR_PER_ACCOUNT: z.coerce.number().int().min(1).default(5),
  PASSWORD_RESET_PER_HOUR_PER_ADDRESS: z.coerce.number().int().min(1).default(30),
  /** Reverse proxies whose X-Forwarded-For is believed: empty, a hop count, or addresses and CIDR ranges. */
  TRUSTED_PROXY: z
    .string()
    .optional()
    .transform((v, ctx) => {
      try {
        return parseTrustedProxy(v);
      } catch (err) {
        ctx.addIssue({ code: "custom", message: `TRUSTED_PROXY: ${(err as Error).message}` });
        return z.NEVER;
      }
    }),
  /** How often each open socket's session and account are read again. */
  SOCKET_RECHECK_MS: z.coerce.number().int().min(100).max(60_000).default(5000),
  RAW_RETENTION_DAYS: z.coerce.number().int().min(1).max(3650).default(14),
  ROLLUP_RETENTION_DAYS: z.coerce.number().int().min(1).max(36_500).default(730),
  INGEST_FLUSH_MS: z.coerce.number().int().min(0).max(250).default(50),
  INGEST_MAX_BATCH_ROWS: z.coerce.number().int().min(100).max(50_000).default(5000),
  GATEWAY_MAX_MSGS_PER_S: z.coerce.number().int().min(1).default(500),
  /**
   * Failed MQTT CONNECTs allowed per window, per gateway user name and per remote address;
   * over either, CONNACK 5 without a password check. Generous per address: a site's gateways
   * may share one NAT address, and each adds at most its own limit (gateway/connect-limiter.ts).
   */
  GATEWAY_CONNECT_WINDOW_S: z.coerce.number().int().min(1).default(300),
  GATEWAY_CONNECT_MAX_PER_GATEWAY: z.coerce.number().int().min(1).default(10),
  GATEWAY_CONNECT_MAX_PER_ADDRESS: z.coerce.number().int().min(1).default(100),
  LIVE_PUSH_MS: z.coerce.number().int().min(50).max(5000).default(200),
  /** After a full disk, writes count as working again once one succeeds this long after the last failure. */
  STORAGE_RECOVERY_S: z.coerce.number().min(0).max(3600).default(30),
  /** External broker mode: Liftline's own session there. */
  MQTT_CLIENT_ID: z.string().min(1).max(23).default("liftline-ingest"),
  MQTT_USERNAME: z.string().min(1).optional(),
  MQTT_PASSWORD: z.string().min(1).optional(),
  /** Origins besides NEXTAUTH_URL's that browsers may send state-changing requests from. */
  ALLOWED_ORIGINS: originList,
  /** Writes (POST/PUT/PATCH/DELETE) and trend requests per minute, per API token or signed-in user. */
  API_WRITES_PER_MIN: z.coerce.number().int().min(1).default(120),
  API_TRENDS_PER_MIN: z.coerce.number().int().min(1).default(600),
  /** How long the HTTP server waits for a request's headers, for all of it, and on an idle kept-alive connection. */
  HTTP_HEADERS_TIMEOUT_MS: ms(10_000),
  HTTP_REQUEST_TIMEOUT_MS: ms(30_000),
  HTTP_KEEP_ALIVE_TIMEOUT_MS: ms(5_000),
});

// Node's http server refuses a headers timeout longer than the request timeout; say so by name.
const checkedConfigSchema = configSchema.refine((c) => c.HTTP_HEADERS_TIMEOUT_MS <= c.HTTP_REQUEST_TIMEOUT_MS, {
  message: "HTTP_HEADERS_TIMEOUT_MS must not exceed HTTP_REQUEST_TIMEOUT_MS",
  path: ["HTTP_HEADERS_TIMEOUT_MS"],
});

export type Config = z.infer<typeof configSchema>;

export function loadConfig(env: NodeJS.ProcessEnv = process.env): Config {
  const parsed = checkedConfigSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid configuration:\n${lines.join("\n")}`);
  }
  return parsed.data;
}
