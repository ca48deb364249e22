import { z } from "zod";
import { notificationPaths } from "@/lib/notify/policy";

// Requests that manage how a person is reached: push devices, a verified mobile number, the
// escalation policy per priority, calendar feeds and opt-in e-mails.

/** A PushSubscription's JSON (Push API §5.1): the endpoint and its RFC 8291 keys, base64url. */
export const pushSubscriptionSchema = z.strictObject({
  endpoint: z.url({ protocol: /^https?$/ }).max(2048),
  keys: z.strictObject({
    p256dh: z
      .string()
      .regex(/^[A-Za-z0-9_-]+={0,2}$/)
      .min(80)
      .max(100),
    auth: z
      .string()
      .regex(/^[A-Za-z0-9_-]+={0,2}$/)
      .min(16)
      .max(30),
  }),
  label: z.string().trim().min(1, "Name the device").max(60).default("This device"),
});

/** E.164: a plus, the country code and up to 15 digits in all (ITU-T E.164). */
export const phoneSchema = z
  .string()
  .trim()
  .transform((v) => v.replace(/[\s().-]/g, ""))
  .pipe(z.string().regex(/^\+[1-9]\d{6,14}$/, "Give the number in international form, e.g. +15555550123"));

export const smsNumberSchema = z.strictObject({ phone: phoneSchema });
export const smsVerifySchema = z.strictObject({
  code: z
    .string()
    .trim()
    .regex(/^\d{6}$/, "The code has 6 digits"),
});
export const smsAlarmsSchema = z.strictObject({ alarmsEnabled: z.boolean() });

const seconds = z
  .number()
  .int()
  .min(0)
  .max(24 * 3600)
  .nullable();

export const policySchema = z
  .strictObject({
    paths: z
      .array(z.enum(notificationPaths))
      .min(1, "Choose at least one path")
      .max(3)
      .refine((p) => new Set(p).size === p.length, "Each path once"),
    backupAfterS: seconds,
    adminsAfterS: seconds,
  })
  .refine((p) => p.adminsAfterS === null || p.backupAfterS === null || p.adminsAfterS >= p.backupAfterS, {
    message: "The admins hear no earlier than the backup",
    path: ["adminsAfterS"],
  });

export const policyParamsSchema = z.strictObject({ priority: z.coerce.number().int().min(1).max(4) });

export const preferencesSchema = z.strictObject({
  alarmStartEndMail: z.boolean(),
  serviceRequestMail: z.boolean(),
});

export const calendarTokenSchema = z.string().regex(/^[A-Za-z0-9_-]{30,60}$/);

/** The fake provider's (and a real one's) inbound-message webhook, as far as Liftline reads it. */
export const inboundSmsSchema = z.object({
  data: z.object({
    event_type: z.string(),
    payload: z.object({
      from: z.object({ phone_number: z.string() }),
      to: z.array(z.object({ phone_number: z.string() })).min(1),
      text: z.string().max(1600),
    }),
  }),
});

/** Which notification an acknowledge link came from (recorded on the alarm's deliveries). */
export const ackLinkQuerySchema = z.strictObject({ via: z.enum(["email", "push"]).default("email") });
