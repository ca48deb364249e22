import { z } from "zod";
import { tokenScopes } from "@/lib/auth/viewer";
import { safeText } from "./text";

/** The lifetimes the token form offers, in days; the API takes any whole number up to the longest. */
export const tokenLifetimesDays = [7, 30, 90, 365] as const;
export const MAX_TOKEN_LIFETIME_DAYS = 365;

export const createTokenSchema = z.object({
  name: safeText(z.string().trim().min(1, "Give the token a name").max(80, "At most 80 characters")),
  /** Days until the token is refused; absent for a token that does not expire. */
  expiresInDays: z
    .number({ error: "Days must be a number" })
    .int("Whole days")
    .min(1, "At least a day")
    .max(MAX_TOKEN_LIFETIME_DAYS, `At most ${MAX_TOKEN_LIFETIME_DAYS} days`)
    .optional(),
  /** Absent: the widest scope the caller may grant (its role's), as tokens had before scopes. */
  scope: z.enum(tokenScopes, { error: "Choose read, act or admin" }).optional(),
});
export type CreateTokenInput = z.infer<typeof createTokenSchema>;
