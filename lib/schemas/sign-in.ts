import { z } from "zod";

export const signInSchema = z.object({
  email: z.email("Enter an e-mail address").max(254),
  password: z.string().min(1, "Enter your password").max(200),
});
export type SignInInput = z.infer<typeof signInSchema>;

/** Error codes the sign-in endpoint hands back to the form; the slowed ones carry `:<seconds to wait>`. */
export const signInErrors = {
  CredentialsSignin: "E-mail or password is incorrect.",
  RateLimited: "Too many failed sign-ins for this account. Try again in {wait}.",
  AddressLimited:
    "E-mail or password is incorrect, and many sign-ins from this network have failed. Check them and try again in {wait}.",
} as const;
export type SignInErrorCode = keyof typeof signInErrors;

/** `RateLimited:30`: next-auth passes a thrown error's message to the form as its error code. */
export function slowedError(code: "RateLimited" | "AddressLimited", retryAfterS: number): string {
  return `${code}:${Math.max(1, Math.ceil(retryAfterS))}`;
}

/** Reads an error the sign-in endpoint answered: its code and, for a slowed attempt, the seconds to wait. */
export function parseSignInError(error: string): { code: SignInErrorCode; retryAfterS: number | null } {
  const match = /^(RateLimited|AddressLimited)(?::(\d{1,6}))?$/.exec(error);
  if (match) return { code: match[1] as SignInErrorCode, retryAfterS: match[2] ? Number(match[2]) : null };
  return { code: "CredentialsSignin", retryAfterS: null };
}

export function signInErrorMessage(error: string): string {
  const { code, retryAfterS } = parseSignInError(error);
  const wait =
    retryAfterS === null
      ? "a few minutes"
      : retryAfterS < 90
        ? `${retryAfterS} seconds`
        : `${Math.ceil(retryAfterS / 60)} minutes`;
  return signInErrors[code].replace("{wait}", wait);
}
