import { z } from "zod";
import { PASSWORD_MAX_LENGTH, PASSWORD_MIN_LENGTH } from "@/lib/auth/password-policy";
import { roles } from "@/lib/auth/viewer";
import { safeText } from "./text";

// People, their own account and their passwords: shared by the admin and settings forms and the routes.
// The password policy itself (length, common passwords) is checked on the server
// (lib/server/people.ts), which holds the common-passwords list.

export const personName = safeText(z.string().trim().min(1, "Enter a name").max(120, "At most 120 characters"));
const email = z.email({ error: "Enter an e-mail address" }).trim().max(254, "At most 254 characters");
/** E.164 allows 15 digits; spaces, dashes, dots and brackets are kept as typed. */
const phone = z
  .string()
  .trim()
  .max(32, "At most 32 characters")
  .regex(/^$|^\+?[0-9 ().-]{5,32}$/, "Digits, spaces, dashes, brackets and a leading +");

export const inviteSchema = z.object({
  email,
  name: personName,
  role: z.enum(roles, { error: "Choose a role" }),
  /** For a customer user, the one customer organization; staff always belong to the service organization. */
  organizationId: z.string().trim().min(1).max(100).optional(),
});
export type InviteInput = z.infer<typeof inviteSchema>;

export const updatePersonSchema = z
  .object({
    role: z.enum(roles).optional(),
    organizationId: z.string().trim().min(1).max(100).optional(),
    disabled: z.boolean().optional(),
  })
  .refine((v) => v.role !== undefined || v.organizationId !== undefined || v.disabled !== undefined, {
    message: "Send role, organizationId or disabled",
  });
export type UpdatePersonInput = z.infer<typeof updatePersonSchema>;

export const accountSchema = z.object({
  name: personName.optional(),
  phone: phone.optional(),
  unitSystem: z.enum(["ip", "si"]).optional(),
});
export type AccountInput = z.infer<typeof accountSchema>;

/** Only the upper bound here: a longer body is refused before hashing; the rest is the server's policy. */
const newPassword = z.string().max(PASSWORD_MAX_LENGTH * 4, `At most ${PASSWORD_MAX_LENGTH} characters`);

export const changePasswordSchema = z.object({
  currentPassword: z.string().min(1, "Enter your current password").max(1024),
  newPassword,
});
export type ChangePasswordInput = z.infer<typeof changePasswordSchema>;

export const passwordResetRequestSchema = z.object({ email });
export type PasswordResetRequestInput = z.infer<typeof passwordResetRequestSchema>;

export const setPasswordSchema = z.object({ password: newPassword });
export type SetPasswordInput = z.infer<typeof setPasswordSchema>;

/** The link's secret: 32 random bytes in base64url (43 characters). */
export const ACCOUNT_LINK_TOKEN_PATTERN = /^[A-Za-z0-9_-]{43}$/;

export const accountLinkRefusal = {
  unknown: "This link is not valid.",
  expired: "This link has expired. Ask for a new one.",
  used: "This link was already used. Ask for a new one if you still need it.",
} as const;

/** The one answer to every reset request, whether or not the address has an account. */
export const PASSWORD_RESET_ANSWER = "If an account exists for that address, we sent a link to reset its password.";

/**
 * The set-password forms: the length rule early, for quick feedback, and the two entries agreeing.
 * Pasting is allowed (password managers; ASVS 5.0 6.2.7); the server checks the full policy.
 */
export const newPasswordFormSchema = z
  .object({
    password: z
      .string()
      .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters`)
      .max(PASSWORD_MAX_LENGTH, `At most ${PASSWORD_MAX_LENGTH} characters`),
    confirm: z.string(),
  })
  .refine((v) => v.password === v.confirm, { message: "The two entries differ", path: ["confirm"] });
export type NewPasswordFormInput = z.infer<typeof newPasswordFormSchema>;

export const changePasswordFormSchema = z
  .object({
    currentPassword: z.string().min(1, "Enter your current password"),
    newPassword: z
      .string()
      .min(PASSWORD_MIN_LENGTH, `Use at least ${PASSWORD_MIN_LENGTH} characters`)
      .max(PASSWORD_MAX_LENGTH, `At most ${PASSWORD_MAX_LENGTH} characters`),
    confirm: z.string(),
  })
  .refine((v) => v.newPassword === v.confirm, { message: "The two entries differ", path: ["confirm"] });
export type ChangePasswordFormInput = z.infer<typeof changePasswordFormSchema>;
