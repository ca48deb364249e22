import "server-only";
import { createHash, randomBytes, randomInt, randomUUID, timingSafeEqual } from "node:crypto";
import { and, asc, desc, eq, inArray, isNotNull, isNull } from "drizzle-orm";
import type { Db } from "../client";
import {
  alarmDeliveries,
  alarms,
  calendarFeeds,
  escalationPolicies,
  notificationPreferences,
  onCallShifts,
  pushSubscriptions,
  sites,
  smsNumbers,
  smsSinkMessages,
  users,
} from "../schema";
import { writeAudit } from "./audit";
import { canAct, isAdmin, type Viewer } from "@/lib/auth/viewer";
import type {
  CalendarFeedDto,
  DeliveryDto,
  PolicyDto,
  PreferencesDto,
  PushDeviceDto,
  SmsMessageDto,
  SmsNumberDto,
} from "@/lib/dto/notify";
import { AppError, notFound } from "@/lib/errors";
import { defaultPolicies, defaultPolicyFor, type NotificationPath, type PriorityPolicy } from "@/lib/notify/policy";

// How people are reached: their push devices and mobile number (each person manages only their
// own), the escalation policy per priority (admins edit it), every notification sent, calendar
// feeds and opt-in e-mails. The sender side (escalation) reads through the *For functions, which
// take a user id because the server acts for nobody in particular there.

const sha256 = (text: string) => createHash("sha256").update(text).digest("hex");

// ---- push subscriptions ----

export interface PushTarget {
  id: string;
  userId: string;
  endpoint: string;
  p256dh: string;
  auth: string;
}

export function listPushDevices(db: Db, viewer: Viewer): PushDeviceDto[] {
  return db
    .select({
      id: pushSubscriptions.id,
      label: pushSubscriptions.label,
      endpoint: pushSubscriptions.endpoint,
      createdAt: pushSubscriptions.createdAt,
      lastSuccessAt: pushSubscriptions.lastSuccessAt,
    })
    .from(pushSubscriptions)
    .where(eq(pushSubscriptions.userId, viewer.userId))
    .orderBy(asc(pushSubscriptions.createdAt))
    .all()
    .map((r) => ({
      id: r.id,
      label: r.label,
      service: new URL(r.endpoint).host,
      createdAt: r.createdAt.getTime(),
      lastSuccessAt: r.lastSuccessAt?.getTime() ?? null,
    }));
}

/** Saves this device's subscription; the same endpoint subscribed again (or by someone else on a shared phone) moves to this person. */
export function savePushSubscription(
  db: Db,
  viewer: Viewer,
  sub: { endpoint: string; p256dh: string; auth: string; label: string },
): PushDeviceDto {
  const id = randomUUID();
  db.insert(pushSubscriptions)
    .values({ id, userId: viewer.userId, ...sub })
    .onConflictDoUpdate({
      target: pushSubscriptions.endpoint,
      set: { userId: viewer.userId, p256dh: sub.p256dh, auth: sub.auth, label: sub.label },
    })
    .run();
  const device = listPushDevices(db, viewer).find(
    (d) => d.service === new URL(sub.endpoint).host && d.label === sub.label,
  );
  if (!device) throw new AppError("internal", "The subscription was not saved.");
  return device;
}

/** Removes one of the viewer's devices; another person's device is not found (404). */
export function deletePushDevice(db: Db, viewer: Viewer, id: string): void {
  const res = db
    .delete(pushSubscriptions)
    .where(and(eq(pushSubscriptions.id, id), eq(pushSubscriptions.userId, viewer.userId)))
    .run();
  if (res.changes === 0) throw notFound("No such device.");
}

export function pushTargetsFor(db: Db, userId: string): PushTarget[] {
  return db
    .select({
      id: pushSubscriptions.id,
      userId: pushSubscriptions.userId,
      endpoint: pushSubscriptions.endpoint,
      p256dh: pushSubscriptions.p256dh,
      auth: pushSubscriptions.auth,
    })
    .from(pushSubscriptions)
    .where(eq(pushSubscriptions.userId, userId))
    .all();
}

/** The push service said the subscription is gone (404/410, RFC 8030 §7.3). */
export function removeDeadSubscription(db: Db, id: string): void {
  db.delete(pushSubscriptions).where(eq(pushSubscriptions.id, id)).run();
}

export function markPushSuccess(db: Db, id: string, atMs: number): void {
  db.update(pushSubscriptions)
    .set({ lastSuccessAt: new Date(atMs) })
    .where(eq(pushSubscriptions.id, id))
    .run();
}

// ---- SMS numbers ----

export const SMS_CODE_TTL_MS = 10 * 60_000;
export const SMS_CODE_MAX_ATTEMPTS = 5;

export function getSmsNumber(db: Db, viewer: Viewer, nowMs: number): SmsNumberDto | null {
  const row = db.select().from(smsNumbers).where(eq(smsNumbers.userId, viewer.userId)).get();
  if (!row) return null;
  return {
    phone: row.phone,
    verified: row.verifiedAt !== null,
    alarmsEnabled: row.alarmsEnabled,
    codePending: row.codeHash !== null && (row.codeExpiresAt?.getTime() ?? 0) > nowMs,
  };
}

/** Sets (or replaces) the viewer's number, unverified, and returns the code to text to it. */
export function startSmsVerification(db: Db, viewer: Viewer, phone: string, nowMs: number): string {
  const code = String(randomInt(0, 1_000_000)).padStart(6, "0");
  const values = {
    phone,
    verifiedAt: null,
    codeHash: sha256(`${viewer.userId}:${code}`),
    codeExpiresAt: new Date(nowMs + SMS_CODE_TTL_MS),
    codeAttempts: 0,
    alarmsEnabled: false,
  };
  db.insert(smsNumbers)
    .values({ userId: viewer.userId, ...values })
    .onConflictDoUpdate({ target: smsNumbers.userId, set: values })
    .run();
  return code;
}

/** Checks a code; a few wrong tries spend it (a 6-digit code must not be guessable by trying). */
export function verifySmsCode(db: Db, viewer: Viewer, code: string, nowMs: number): SmsNumberDto {
  const row = db.select().from(smsNumbers).where(eq(smsNumbers.userId, viewer.userId)).get();
  if (!row) throw notFound("Add a number first.");
  if (row.verifiedAt) return getSmsNumber(db, viewer, nowMs)!;
  if (!row.codeHash || !row.codeExpiresAt || row.codeExpiresAt.getTime() <= nowMs)
    throw new AppError("conflict", "The code has expired. Ask for a new one.");
  if (row.codeAttempts >= SMS_CODE_MAX_ATTEMPTS)
    throw new AppError("conflict", "Too many wrong codes. Ask for a new one.");
  const given = Buffer.from(sha256(`${viewer.userId}:${code}`));
  if (!timingSafeEqual(given, Buffer.from(row.codeHash))) {
    db.update(smsNumbers)
      .set({ codeAttempts: row.codeAttempts + 1 })
      .where(eq(smsNumbers.userId, viewer.userId))
      .run();
    throw new AppError("bad_request", "That code is not right.");
  }
  db.update(smsNumbers)
    .set({ verifiedAt: new Date(nowMs), codeHash: null, codeExpiresAt: null, codeAttempts: 0, alarmsEnabled: true })
    .where(eq(smsNumbers.userId, viewer.userId))
    .run();
  return getSmsNumber(db, viewer, nowMs)!;
}

export function setSmsAlarms(db: Db, viewer: Viewer, enabled: boolean, nowMs: number): SmsNumberDto {
  const res = db
    .update(smsNumbers)
    .set({ alarmsEnabled: enabled })
    .where(and(eq(smsNumbers.userId, viewer.userId), isNotNull(smsNumbers.verifiedAt)))
    .run();
  if (res.changes === 0) throw notFound("No verified number.");
  return getSmsNumber(db, viewer, nowMs)!;
}

export function deleteSmsNumber(db: Db, viewer: Viewer): void {
  if (db.delete(smsNumbers).where(eq(smsNumbers.userId, viewer.userId)).run().changes === 0)
    throw notFound("No number.");
}

/** A person's verified number that takes alarm texts, or null. */
export function smsTargetFor(db: Db, userId: string): string | null {
  const row = db
    .select({ phone: smsNumbers.phone })
    .from(smsNumbers)
    .where(and(eq(smsNumbers.userId, userId), isNotNull(smsNumbers.verifiedAt), eq(smsNumbers.alarmsEnabled, true)))
    .get();
  return row?.phone ?? null;
}

/** Who owns a verified number (an inbound reply names only its sender). */
export function userIdsByVerifiedPhone(db: Db, phone: string): string[] {
  return db
    .select({ userId: smsNumbers.userId })
    .from(smsNumbers)
    .where(and(eq(smsNumbers.phone, phone), isNotNull(smsNumbers.verifiedAt)))
    .all()
    .map((r) => r.userId);
}

// ---- escalation policies ----

export function policyFor(db: Db, priority: number): PriorityPolicy {
  const row = db.select().from(escalationPolicies).where(eq(escalationPolicies.priority, priority)).get();
  if (!row) return defaultPolicyFor(priority);
  return { priority, paths: row.paths, backupAfterS: row.backupAfterS, adminsAfterS: row.adminsAfterS };
}

/** Staff read the policies (the rota and alarm pages explain who hears what). */
export function listPolicies(db: Db, viewer: Viewer): PolicyDto[] {
  if (!canAct(viewer)) throw new AppError("forbidden", "Only the service company's staff can see this.");
  const rows = new Map(
    db
      .select({
        priority: escalationPolicies.priority,
        paths: escalationPolicies.paths,
        backupAfterS: escalationPolicies.backupAfterS,
        adminsAfterS: escalationPolicies.adminsAfterS,
        updatedAt: escalationPolicies.updatedAt,
        updatedBy: users.name,
      })
      .from(escalationPolicies)
      .leftJoin(users, eq(users.id, escalationPolicies.updatedBy))
      .all()
      .map((r) => [r.priority, r]),
  );
  return defaultPolicies.map((d) => {
    const row = rows.get(d.priority);
    return {
      priority: d.priority,
      paths: row?.paths ?? d.paths,
      backupAfterS: row ? row.backupAfterS : d.backupAfterS,
      adminsAfterS: row ? row.adminsAfterS : d.adminsAfterS,
      reason: d.reason,
      isDefault: !row,
      updatedAt: row?.updatedAt.getTime() ?? null,
      updatedBy: row?.updatedBy ?? null,
    };
  });
}

/** An admin changes one priority's policy; the change and its audit entry commit together. */
export function savePolicy(
  db: Db,
  viewer: Viewer,
  priority: number,
  input: { paths: NotificationPath[]; backupAfterS: number | null; adminsAfterS: number | null },
  nowMs: number,
): PolicyDto {
  if (!isAdmin(viewer)) throw new AppError("forbidden", "Only an admin can change escalation.");
  db.transaction(
    (tx) => {
      const before = policyFor(tx as unknown as Db, priority);
      const values = { ...input, updatedBy: viewer.userId, updatedAt: new Date(nowMs) };
      tx.insert(escalationPolicies)
        .values({ priority, ...values })
        .onConflictDoUpdate({ target: escalationPolicies.priority, set: values })
        .run();
      writeAudit(
        tx,
        viewer,
        {
          action: "update",
          entityType: "escalation_policy",
          entityId: String(priority),
          summary: `Escalation for priority ${priority}: ${input.paths.join(" + ")}, backup ${input.backupAfterS ?? "never"} s, admins ${input.adminsAfterS ?? "never"} s`,
          before: { paths: before.paths, backupAfterS: before.backupAfterS, adminsAfterS: before.adminsAfterS },
          after: input,
        },
        nowMs,
      );
    },
    { behavior: "immediate" },
  );
  return listPolicies(db, viewer).find((p) => p.priority === priority)!;
}

// ---- deliveries ----

export interface DeliveryRecord {
  alarmId: string;
  activation: number;
  step: number;
  userId: string;
  path: NotificationPath;
  target: string;
  status: "sent" | "delivered" | "failed";
  detail?: string | null;
  sentAt: number;
}

export function recordDelivery(db: Db, d: DeliveryRecord): number {
  const row = db
    .insert(alarmDeliveries)
    .values({ ...d, detail: d.detail ?? null, sentAt: new Date(d.sentAt), statusAt: new Date(d.sentAt) })
    .returning({ id: alarmDeliveries.id })
    .get();
  return row.id;
}

/** The steps already taken for an activation and when the first went out. */
export function deliveriesOf(db: Db, alarmId: string, activation: number) {
  return db
    .select({ step: alarmDeliveries.step, userId: alarmDeliveries.userId, sentAt: alarmDeliveries.sentAt })
    .from(alarmDeliveries)
    .where(and(eq(alarmDeliveries.alarmId, alarmId), eq(alarmDeliveries.activation, activation)))
    .all()
    .map((r) => ({ ...r, sentAt: r.sentAt.getTime() }));
}

/** Marks what the person acknowledged through (their deliveries on that path for the activation). */
export function markAcknowledged(
  db: Db,
  args: { alarmId: string; activation: number; userId: string; path: NotificationPath; atMs: number },
): void {
  db.update(alarmDeliveries)
    .set({ status: "acknowledged", statusAt: new Date(args.atMs) })
    .where(
      and(
        eq(alarmDeliveries.alarmId, args.alarmId),
        eq(alarmDeliveries.activation, args.activation),
        eq(alarmDeliveries.userId, args.userId),
        eq(alarmDeliveries.path, args.path),
      ),
    )
    .run();
}

/** An alarm's notifications for its history: staff only (they name people and their numbers). */
export function listDeliveries(db: Db, viewer: Viewer, alarmId: string): DeliveryDto[] {
  if (!canAct(viewer)) return [];
  return db
    .select({
      id: alarmDeliveries.id,
      activation: alarmDeliveries.activation,
      step: alarmDeliveries.step,
      person: users.name,
      path: alarmDeliveries.path,
      target: alarmDeliveries.target,
      status: alarmDeliveries.status,
      detail: alarmDeliveries.detail,
      sentAt: alarmDeliveries.sentAt,
      statusAt: alarmDeliveries.statusAt,
    })
    .from(alarmDeliveries)
    .innerJoin(users, eq(users.id, alarmDeliveries.userId))
    .where(eq(alarmDeliveries.alarmId, alarmId))
    .orderBy(desc(alarmDeliveries.id))
    .all()
    .map((r) => ({ ...r, sentAt: r.sentAt.getTime(), statusAt: r.statusAt.getTime() }));
}

/** Alarms (awaiting acknowledgement) whose activation was texted to one of these people. */
export function smsDeliveriesTo(db: Db, userIds: string[], phone: string) {
  if (userIds.length === 0) return [];
  return db
    .selectDistinct({
      alarmId: alarmDeliveries.alarmId,
      activation: alarmDeliveries.activation,
      userId: alarmDeliveries.userId,
    })
    .from(alarmDeliveries)
    .where(
      and(
        inArray(alarmDeliveries.userId, userIds),
        eq(alarmDeliveries.path, "sms"),
        eq(alarmDeliveries.target, phone),
        inArray(alarmDeliveries.status, ["sent", "delivered"]),
      ),
    )
    .all();
}

// ---- calendar feeds ----

export function listCalendarFeeds(db: Db, viewer: Viewer): CalendarFeedDto[] {
  return db
    .select({ id: calendarFeeds.id, createdAt: calendarFeeds.createdAt, revokedAt: calendarFeeds.revokedAt })
    .from(calendarFeeds)
    .where(eq(calendarFeeds.userId, viewer.userId))
    .orderBy(desc(calendarFeeds.createdAt))
    .all()
    .map((r) => ({ id: r.id, createdAt: r.createdAt.getTime(), revokedAt: r.revokedAt?.getTime() ?? null }));
}

/** A new private feed for the viewer's own shifts; the token is shown once, only its hash is kept. */
export function createCalendarFeed(db: Db, viewer: Viewer): { feed: CalendarFeedDto; token: string } {
  if (!canAct(viewer)) throw new AppError("forbidden", "Only people on the rota have on-call shifts.");
  const token = randomBytes(32).toString("base64url");
  const id = randomUUID();
  db.insert(calendarFeeds)
    .values({ id, userId: viewer.userId, tokenHash: sha256(token) })
    .run();
  return { feed: listCalendarFeeds(db, viewer).find((f) => f.id === id)!, token };
}

export function revokeCalendarFeed(db: Db, viewer: Viewer, id: string, nowMs: number): void {
  const res = db
    .update(calendarFeeds)
    .set({ revokedAt: new Date(nowMs) })
    .where(and(eq(calendarFeeds.id, id), eq(calendarFeeds.userId, viewer.userId), isNull(calendarFeeds.revokedAt)))
    .run();
  if (res.changes === 0) throw notFound("No such feed.");
}

/** The person a live feed token belongs to, or null (unknown, revoked, or the account disabled). */
export function calendarFeedOwner(db: Db, token: string): { userId: string; name: string } | null {
  return (
    db
      .select({ userId: users.id, name: users.name })
      .from(calendarFeeds)
      .innerJoin(users, eq(users.id, calendarFeeds.userId))
      .where(
        and(eq(calendarFeeds.tokenHash, sha256(token)), isNull(calendarFeeds.revokedAt), eq(users.disabled, false)),
      )
      .get() ?? null
  );
}

/** A person's own shifts (as primary or backup), with the other person's name. */
export function shiftsOf(db: Db, userId: string) {
  const names = new Map(
    db
      .select({ id: users.id, name: users.name })
      .from(users)
      .all()
      .map((u) => [u.id, u.name]),
  );
  return db
    .select()
    .from(onCallShifts)
    .orderBy(asc(onCallShifts.startsAt))
    .all()
    .filter((s) => s.primaryUserId === userId || s.backupUserId === userId)
    .map((s) => ({
      id: s.id,
      startsAt: s.startsAt,
      endsAt: s.endsAt,
      role: s.primaryUserId === userId ? ("primary" as const) : ("backup" as const),
      primaryName: names.get(s.primaryUserId) ?? "",
      backupName: s.backupUserId ? (names.get(s.backupUserId) ?? null) : null,
    }));
}

// ---- preferences ----

export function getPreferences(db: Db, viewer: Viewer): PreferencesDto {
  const row = db
    .select({
      alarmStartEndMail: notificationPreferences.alarmStartEndMail,
      serviceRequestMail: notificationPreferences.serviceRequestMail,
    })
    .from(notificationPreferences)
    .where(eq(notificationPreferences.userId, viewer.userId))
    .get();
  return row ?? { alarmStartEndMail: false, serviceRequestMail: false };
}

export function savePreferences(db: Db, viewer: Viewer, prefs: PreferencesDto): PreferencesDto {
  db.insert(notificationPreferences)
    .values({ userId: viewer.userId, ...prefs })
    .onConflictDoUpdate({ target: notificationPreferences.userId, set: prefs })
    .run();
  return getPreferences(db, viewer);
}

/** Customer users of an organization who opted in to one kind of plain-language e-mail. */
function customerMailSubscribers(
  db: Db,
  organizationId: string,
  preference: "alarmStartEndMail" | "serviceRequestMail",
): Array<{ id: string; email: string; name: string; unitSystem: "ip" | "si" }> {
  return db
    .select({ id: users.id, email: users.email, name: users.name, unitSystem: users.unitSystem })
    .from(notificationPreferences)
    .innerJoin(users, eq(users.id, notificationPreferences.userId))
    .where(
      and(
        eq(users.organizationId, organizationId),
        eq(users.role, "customer"),
        eq(users.disabled, false),
        eq(notificationPreferences[preference], true),
      ),
    )
    .all();
}

/** Customer users of the organization owning a site who asked to hear when its service requests move on. */
export function serviceRequestMailSubscribers(db: Db, siteId: string) {
  const site = db.select({ organizationId: sites.organizationId }).from(sites).where(eq(sites.id, siteId)).get();
  return site ? customerMailSubscribers(db, site.organizationId, "serviceRequestMail") : [];
}

/** Customer users of an organization who asked to hear when high and critical alarms start and end. */
export function alarmMailSubscribers(db: Db, organizationId: string) {
  return customerMailSubscribers(db, organizationId, "alarmStartEndMail");
}

// ---- the fake SMS provider's messages ----

export function storeSmsSinkMessage(
  db: Db,
  m: { direction: "outbound" | "inbound"; from: string; to: string; body: string },
): number {
  return db
    .insert(smsSinkMessages)
    .values({ direction: m.direction, fromNumber: m.from, toNumber: m.to, body: m.body })
    .returning({ id: smsSinkMessages.id })
    .get().id;
}

export function listSmsSinkMessages(db: Db, viewer: Viewer, limit = 200): SmsMessageDto[] {
  if (!isAdmin(viewer)) throw new AppError("forbidden", "Only an admin can read the texts.");
  return db
    .select({
      id: smsSinkMessages.id,
      direction: smsSinkMessages.direction,
      from: smsSinkMessages.fromNumber,
      to: smsSinkMessages.toNumber,
      body: smsSinkMessages.body,
      receivedAt: smsSinkMessages.receivedAt,
    })
    .from(smsSinkMessages)
    .orderBy(desc(smsSinkMessages.id))
    .limit(limit)
    .all()
    .map((r) => ({ ...r, receivedAt: r.receivedAt.getTime() }));
}

/** What a customer's opt-in e-mail says about an alarm: the site, the owner's message, the organization to tell. */
export function alarmForCustomerMail(
  db: Db,
  siteId: string,
  key: string,
): { siteName: string; organizationId: string; equipment: string; ownerMessage: string } | null {
  const row = db
    .select({
      siteName: sites.name,
      organizationId: sites.organizationId,
      equipment: alarms.equipment,
      detailJson: alarms.detailJson,
    })
    .from(alarms)
    .innerJoin(sites, eq(sites.id, alarms.siteId))
    // A training site's alarms are drills: no customer hears of them.
    .where(and(eq(alarms.siteId, siteId), eq(alarms.key, key), eq(sites.training, false)))
    .get();
  if (!row) return null;
  let ownerMessage = "";
  try {
    ownerMessage = (JSON.parse(row.detailJson) as { ownerMessage?: string }).ownerMessage ?? "";
  } catch {
    // an unreadable detail still gets the plain notice
  }
  return { siteName: row.siteName, organizationId: row.organizationId, equipment: row.equipment, ownerMessage };
}
