import "server-only";
import { createHash, randomBytes, randomUUID } from "node:crypto";
import { and, asc, desc, eq, gt, inArray, isNull, lte } from "drizzle-orm";
import type { Db } from "../client";
import { ackLinks, alarmNotifications, alarms, mailMessages, onCallShifts, users } from "../schema";
import type { Shift } from "@/lib/oncall/rota";
import type { MailDto, ShiftDto } from "@/lib/dto/oncall";

// The on-call rota, the e-mails sent for alarms, single-use acknowledge links and the mail sink.

export function listShifts(db: Db, fromMs: number): ShiftDto[] {
  const rows = db
    .select({
      id: onCallShifts.id,
      startsAt: onCallShifts.startsAt,
      endsAt: onCallShifts.endsAt,
      primaryUserId: onCallShifts.primaryUserId,
      backupUserId: onCallShifts.backupUserId,
      primaryName: users.name,
    })
    .from(onCallShifts)
    .innerJoin(users, eq(users.id, onCallShifts.primaryUserId))
    .where(gt(onCallShifts.endsAt, fromMs))
    .orderBy(asc(onCallShifts.startsAt))
    .all();
  const names = new Map(
    db
      .select({ id: users.id, name: users.name })
      .from(users)
      .all()
      .map((u) => [u.id, u.name]),
  );
  return rows.map((r) => ({ ...r, backupName: r.backupUserId ? (names.get(r.backupUserId) ?? null) : null }));
}

export function allShifts(db: Db): Shift[] {
  return db.select().from(onCallShifts).all();
}

export function createShift(db: Db, shift: Omit<Shift, "id">): Shift {
  const row = { id: randomUUID(), ...shift };
  db.insert(onCallShifts).values(row).run();
  return row;
}

export function deleteShift(db: Db, id: string): boolean {
  return db.delete(onCallShifts).where(eq(onCallShifts.id, id)).run().changes > 0;
}

/** Staff who can be put on call (admins and technicians), for the rota form. */
export function onCallCandidates(db: Db): Array<{ id: string; name: string; email: string; role: string }> {
  return db
    .select({ id: users.id, name: users.name, email: users.email, role: users.role })
    .from(users)
    .where(and(inArray(users.role, ["admin", "technician"]), eq(users.disabled, false)))
    .orderBy(asc(users.name))
    .all();
}

export function contactOf(db: Db, userId: string): { id: string; name: string; email: string } | null {
  return (
    db.select({ id: users.id, name: users.name, email: users.email }).from(users).where(eq(users.id, userId)).get() ??
    null
  );
}

export function admins(db: Db): Array<{ id: string; name: string; email: string }> {
  return db
    .select({ id: users.id, name: users.name, email: users.email })
    .from(users)
    .where(and(eq(users.role, "admin"), eq(users.disabled, false)))
    .all();
}

/** High-priority alarms that still wait for someone to acknowledge them. */
export function alarmsAwaitingAck(db: Db, maxPriority: number) {
  return db
    .select({
      id: alarms.id,
      siteId: alarms.siteId,
      priority: alarms.priority,
      activations: alarms.activations,
      state: alarms.state,
    })
    .from(alarms)
    .where(
      and(
        inArray(alarms.state, ["unacknowledged", "returned_unacknowledged", "latched"]),
        lte(alarms.priority, maxPriority),
      ),
    )
    .all();
}

export function notificationsFor(db: Db, alarmId: string, activation: number) {
  return db
    .select({ step: alarmNotifications.step, userId: alarmNotifications.userId, sentAt: alarmNotifications.sentAt })
    .from(alarmNotifications)
    .where(and(eq(alarmNotifications.alarmId, alarmId), eq(alarmNotifications.activation, activation)))
    .all();
}

export function recordNotification(
  db: Db,
  row: { alarmId: string; activation: number; step: number; userId: string; email: string; sentAt: number },
): void {
  db.insert(alarmNotifications).values(row).onConflictDoNothing().run();
}

const hashLink = (token: string) => createHash("sha256").update(token).digest("hex");

/** A fresh single-use link token; only its hash is stored. */
export function createAckLink(db: Db, alarmId: string, userId: string, expiresAt: number): string {
  const token = randomBytes(32).toString("base64url");
  db.insert(ackLinks)
    .values({ id: hashLink(token), alarmId, userId, expiresAt })
    .run();
  return token;
}

export type AckLinkLookup =
  { ok: true; alarmId: string; userId: string } | { ok: false; reason: "unknown" | "expired" | "used" };

/** What a link would acknowledge, without using it (the page shows it before the button). */
export function peekAckLink(db: Db, token: string, nowMs: number): AckLinkLookup {
  const row = db
    .select()
    .from(ackLinks)
    .where(eq(ackLinks.id, hashLink(token)))
    .get();
  if (!row) return { ok: false, reason: "unknown" };
  if (row.usedAt !== null) return { ok: false, reason: "used" };
  if (row.expiresAt <= nowMs) return { ok: false, reason: "expired" };
  return { ok: true, alarmId: row.alarmId, userId: row.userId };
}

/** Uses a link exactly once: the conditional UPDATE makes two clicks race safely. */
export function consumeAckLink(db: Db, token: string, nowMs: number): AckLinkLookup {
  const peek = peekAckLink(db, token, nowMs);
  if (!peek.ok) return peek;
  const used = db
    .update(ackLinks)
    .set({ usedAt: nowMs })
    .where(and(eq(ackLinks.id, hashLink(token)), isNull(ackLinks.usedAt), gt(ackLinks.expiresAt, nowMs)))
    .run();
  return used.changes === 1 ? peek : { ok: false, reason: "used" };
}

export function listMail(db: Db, limit = 100): MailDto[] {
  return db
    .select({
      id: mailMessages.id,
      from: mailMessages.fromAddress,
      to: mailMessages.toAddress,
      subject: mailMessages.subject,
      text: mailMessages.text,
      receivedAt: mailMessages.receivedAt,
    })
    .from(mailMessages)
    .orderBy(desc(mailMessages.id))
    .limit(limit)
    .all();
}

/** Stores a message the local SMTP sink received (the Outbox page reads them). */
export function storeSinkMessage(
  db: Db,
  message: { from: string; to: string; subject: string; text: string; receivedAt?: number },
): void {
  db.insert(mailMessages)
    .values({
      fromAddress: message.from,
      toAddress: message.to,
      subject: message.subject,
      text: message.text,
      ...(message.receivedAt === undefined ? {} : { receivedAt: message.receivedAt }),
    })
    .run();
}
