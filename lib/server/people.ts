import { randomBytes } from "node:crypto";
import bcrypt from "bcryptjs";
import type { Db } from "@/db/client";
import { hashPassword } from "@/db/password";
import { writeAudit } from "@/db/queries/audit";
import {
  countOtherEnabledAdmins,
  createAccountLink,
  emailTaken,
  endAccountLinks,
  findEnabledUserByEmail,
  getAccount,
  getOrganizationKind,
  getPasswordHash,
  getPerson,
  getServiceOrganizationId,
  insertInvitedUser,
  markAccountLinkUsed,
  peekAccountLink,
  setPasswordHash,
  updateAccount,
  type LinkPurpose,
} from "@/db/queries/people";
import { revokeOtherSessions, revokeUserSessions } from "@/db/queries/sessions";
import { getViewerById } from "@/db/queries/users";
import { COMMON_PASSWORDS } from "@/lib/auth/common-passwords";
import { DEFAULT_DEMO_PASSWORD, passwordProblems } from "@/lib/auth/password-policy";
import type { Role, Viewer } from "@/lib/auth/viewer";
import type { AccountDto, PersonDto } from "@/lib/dto/people";
import { AppError, notFound } from "@/lib/errors";
import { accountLinkRefusal, type AccountInput, type InviteInput, type UpdatePersonInput } from "@/lib/schemas/people";
import { loadConfig } from "./config";
import { requireAdmin } from "./guards";
import { getRuntime, passwordResetLimiter } from "./runtime";
import { disableUser, enableUser, changeUserAccess } from "./users";

// People as whole acts: each writes, audits in the same transaction, mails and tells the running
// server (sessions, sockets) in one call, so no route can do half of it.

const publicUrl = () => process.env.NEXTAUTH_URL ?? `http://localhost:${process.env.PORT ?? 3000}`;
const linkPath: Record<LinkPurpose, string> = { invite: "invite", reset: "reset-password" };
const linkUrl = (purpose: LinkPurpose, token: string) => `${publicUrl()}/${linkPath[purpose]}/${token}`;

function hours(seconds: number): string {
  return seconds >= 7200 ? `${Math.round(seconds / 3600)} hours` : `${Math.max(1, Math.round(seconds / 60))} minutes`;
}

/** What the audit keeps of a person: never a password hash or a link. */
const audited = (p: Pick<PersonDto, "email" | "name" | "role" | "organizationId" | "status">) => ({
  email: p.email,
  name: p.name,
  role: p.role,
  organizationId: p.organizationId,
  status: p.status,
});

/** Staff belong to the service organization; a customer user to exactly one customer organization. */
function organizationFor(db: Db, role: Role, organizationId: string | undefined): string {
  if (role !== "customer") {
    const service = getServiceOrganizationId(db);
    if (!service) throw new AppError("conflict", "There is no service organization to put staff in.");
    if (organizationId !== undefined && organizationId !== service)
      throw new AppError("bad_request", "Staff belong to the service organization.", [
        { path: "organizationId", message: "Staff belong to the service organization" },
      ]);
    return service;
  }
  if (!organizationId || getOrganizationKind(db, organizationId) !== "customer")
    throw new AppError("bad_request", "Choose the customer organization this person belongs to.", [
      { path: "organizationId", message: "Choose a customer organization" },
    ]);
  return organizationId;
}

async function sendLink(to: string, purpose: LinkPurpose, token: string, name: string, ttlS: number) {
  const runtime = getRuntime();
  if (!runtime) throw new AppError("unavailable", "Mail is not available in this process.");
  const text =
    purpose === "invite"
      ? [
          `Hello ${name},`,
          "",
          "You have been invited to Liftline. Choose your password here:",
          linkUrl(purpose, token),
          "",
          `The link works once and expires in ${hours(ttlS)}. If you did not expect this, ignore this message.`,
        ]
      : [
          `Hello ${name},`,
          "",
          "Someone asked to reset the password of your Liftline account. Choose a new one here:",
          linkUrl(purpose, token),
          "",
          `The link works once and expires in ${hours(ttlS)}. Setting a new password signs you out everywhere.`,
          "If you did not ask for this, ignore this message: your password stays as it is.",
        ];
  await runtime.sendMail({
    to,
    subject: purpose === "invite" ? "Liftline: you are invited" : "Liftline: reset your password",
    text: text.join("\n"),
  });
}

/** A new person with no password yet, and an e-mailed link to choose one. */
export async function invitePerson(db: Db, actor: Viewer, input: InviteInput): Promise<PersonDto> {
  requireAdmin(actor);
  const organizationId = organizationFor(db, input.role, input.organizationId);
  if (emailTaken(db, input.email)) throw new AppError("conflict", "Someone with this e-mail address already exists.");
  // A real bcrypt hash of a secret nobody keeps: the account cannot sign in, and refusing it costs what any refusal costs.
  const unusableHash = await hashPassword(randomBytes(32).toString("base64url"));
  const ttlS = loadConfig().INVITE_LINK_TTL_S;
  const { person, token } = db.transaction(
    (tx) => {
      const id = insertInvitedUser(db, { ...input, organizationId, unusableHash });
      const token = createAccountLink(db, id, "invite", Date.now() + ttlS * 1000);
      const person = getPerson(db, actor, id)!;
      writeAudit(tx, actor, {
        action: "invite",
        entityType: "person",
        entityId: id,
        summary: `Invited ${person.name} <${person.email}> as ${person.role}`,
        before: null,
        after: audited(person),
      });
      return { person, token };
    },
    { behavior: "immediate" },
  );
  await sendLink(person.email, "invite", token, person.name, ttlS);
  return person;
}

/** A new invitation link; the earlier ones stop working. */
export async function resendInvitation(db: Db, actor: Viewer, userId: string): Promise<PersonDto> {
  requireAdmin(actor);
  const ttlS = loadConfig().INVITE_LINK_TTL_S;
  const { person, token } = db.transaction(
    (tx) => {
      const person = getPerson(db, actor, userId);
      if (!person) throw notFound("No such person.");
      if (person.status !== "invited")
        throw new AppError("conflict", "This person has already set a password (or is disabled); nothing to re-send.");
      const token = createAccountLink(db, userId, "invite", Date.now() + ttlS * 1000);
      writeAudit(tx, actor, {
        action: "resend_invitation",
        entityType: "person",
        entityId: userId,
        summary: `Invitation re-sent to ${person.name} <${person.email}>`,
        before: audited(person),
        after: audited(person),
      });
      return { person, token };
    },
    { behavior: "immediate" },
  );
  await sendLink(person.email, "invite", token, person.name, ttlS);
  return person;
}

/**
 * Role, organization and disabled, in one transaction with its audit entries. The last enabled
 * administrator cannot be demoted or disabled, by anyone, themself included: nobody could undo it.
 */
export function updatePerson(db: Db, actor: Viewer, userId: string, patch: UpdatePersonInput): PersonDto {
  requireAdmin(actor);
  return db.transaction(
    (tx) => {
      const before = getPerson(db, actor, userId);
      if (!before) throw notFound("No such person.");
      const role = patch.role ?? before.role;
      const roleOrOrgChanged =
        (patch.role !== undefined && patch.role !== before.role) ||
        (patch.organizationId !== undefined && patch.organizationId !== before.organizationId);
      const organizationId = roleOrOrgChanged
        ? organizationFor(db, role, patch.organizationId ?? (role === "customer" ? before.organizationId : undefined))
        : before.organizationId;
      const disabling = patch.disabled === true && before.status !== "disabled";
      const enabling = patch.disabled === false && before.status === "disabled";
      const losesAdmin = before.role === "admin" && before.status === "active" && (role !== "admin" || disabling);
      if (losesAdmin && countOtherEnabledAdmins(db, userId) === 0)
        throw new AppError(
          "conflict",
          "This is the last enabled administrator: make someone else an administrator first, or nobody could manage Liftline.",
        );
      if (role !== before.role || organizationId !== before.organizationId) {
        changeUserAccess(db, actor, userId, { role, organizationId });
        const after = getPerson(db, actor, userId)!;
        writeAudit(tx, actor, {
          action: "change_access",
          entityType: "person",
          entityId: userId,
          summary: `${before.name}: ${before.role} of ${before.organizationName} → ${after.role} of ${after.organizationName}`,
          before: audited(before),
          after: audited(after),
        });
      }
      if (disabling || enabling) {
        const prior = getPerson(db, actor, userId)!;
        if (disabling) disableUser(db, actor, userId);
        else enableUser(db, actor, userId);
        const after = getPerson(db, actor, userId)!;
        writeAudit(tx, actor, {
          action: disabling ? "disable" : "enable",
          entityType: "person",
          entityId: userId,
          summary: `${before.name} ${disabling ? "disabled" : "re-enabled"}`,
          before: audited(prior),
          after: audited(after),
        });
      }
      return getPerson(db, actor, userId)!;
    },
    { behavior: "immediate" },
  );
}

function checkPassword(password: string, email: string): void {
  const problems = passwordProblems(password, {
    commonPasswords: COMMON_PASSWORDS,
    email,
    demoPassword: process.env.LIFTLINE_DEMO_PASSWORD ?? DEFAULT_DEMO_PASSWORD,
  });
  if (problems.length > 0)
    throw new AppError(
      "bad_request",
      problems.map((p) => p.message).join(" "),
      problems.map((p) => ({ path: "password", code: p.code, message: p.message })),
    );
}

/**
 * Always the same answer, whether or not the address has an account (OWASP Forgot Password Cheat
 * Sheet): the link is made and the mail handed off without being awaited, so unknown addresses
 * take about as long as known ones. Over the limit: 429, counted the same for any address.
 */
export async function requestPasswordReset(db: Db, email: string, clientAddress: string): Promise<void> {
  const waitS = await passwordResetLimiter().take(email.trim().toLowerCase(), clientAddress);
  if (waitS > 0)
    throw new AppError("rate_limited", `Too many reset requests; try again in ${Math.ceil(waitS / 60)} min.`);
  const ttlS = loadConfig().RESET_LINK_TTL_S;
  const person = findEnabledUserByEmail(db, email);
  if (!person) {
    // The same random draw the real path makes, so its cost is not the tell.
    randomBytes(32).toString("base64url");
    return;
  }
  const token = createAccountLink(db, person.id, "reset", Date.now() + ttlS * 1000);
  sendLink(person.email, "reset", token, person.name, ttlS).catch((err: unknown) =>
    console.error(`[auth] the reset link for ${person.email} could not be sent:`, err),
  );
}

/**
 * Sets a password through an e-mailed link: the link is used once, every other link and every
 * session of the person end (OWASP ASVS 5.0 §7.4.3), and the person signs in with it next.
 */
export async function setPasswordWithLink(
  db: Db,
  token: string,
  password: string,
): Promise<{ purpose: LinkPurpose; email: string }> {
  const link = peekAccountLink(db, token, Date.now());
  if (!link.ok)
    throw new AppError(link.reason === "unknown" ? "not_found" : "conflict", accountLinkRefusal[link.reason]);
  checkPassword(password, link.email);
  const passwordHash = await hashPassword(password);
  db.transaction(
    (tx) => {
      const now = Date.now();
      // Another request may have used it while the hash was made, or it may have just expired.
      if (link.expiresAtMs <= now) throw new AppError("conflict", accountLinkRefusal.expired);
      if (!markAccountLinkUsed(db, link.linkId, now)) throw new AppError("conflict", accountLinkRefusal.used);
      const person = getViewerById(db, link.userId);
      if (!person) throw new AppError("not_found", accountLinkRefusal.unknown);
      setPasswordHash(db, link.userId, passwordHash, now);
      // Unused links die too: a reset after an invitation must not leave the invitation working.
      endAccountLinks(db, link.userId, now);
      revokeUserSessions(db, link.userId);
      writeAudit(tx, person, {
        action: link.purpose === "invite" ? "accept_invitation" : "reset_password",
        entityType: "person",
        entityId: link.userId,
        summary:
          link.purpose === "invite"
            ? `${person.name} set a first password from the invitation`
            : `${person.name} reset the password from an e-mailed link; other sessions signed out`,
        before: null,
        after: null,
      });
    },
    { behavior: "immediate" },
  );
  getRuntime()?.disconnectUserSockets(link.userId);
  return { purpose: link.purpose, email: link.email };
}

/** A signed-in person's new password: the current one is required, and their other sessions end. */
export async function changeOwnPassword(
  db: Db,
  viewer: Viewer & { sessionId?: string },
  currentPassword: string,
  newPassword: string,
): Promise<void> {
  const hash = getPasswordHash(db, viewer.userId);
  if (!hash || !(await bcrypt.compare(currentPassword, hash)))
    throw new AppError("bad_request", "The current password is not right.", [
      { path: "currentPassword", message: "The current password is not right" },
    ]);
  checkPassword(newPassword, viewer.email);
  if (await bcrypt.compare(newPassword, hash))
    throw new AppError("bad_request", "The new password is the current one.", [
      { path: "newPassword", message: "Choose a password other than the current one" },
    ]);
  const passwordHash = await hashPassword(newPassword);
  db.transaction(
    () => {
      setPasswordHash(db, viewer.userId, passwordHash);
      if (viewer.sessionId) revokeOtherSessions(db, viewer.userId, viewer.sessionId);
      else revokeUserSessions(db, viewer.userId);
    },
    { behavior: "immediate" },
  );
}

export function saveOwnAccount(db: Db, viewer: Viewer, input: AccountInput): AccountDto {
  updateAccount(db, viewer, { ...input, phone: input.phone === undefined ? undefined : input.phone || null });
  return getAccount(db, viewer)!;
}
