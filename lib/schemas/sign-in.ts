import { z } from "zod";

export const signInSchema = z.object({
  email: z.email("Enter an e-mail address").max(254),
  password: z.string().min(1, "Enter your password").max(200),
});
export type SignInInput = z.infer<typeof signInSchema>;

/** Error codes the sign-in endpoint hands back to the form. */
export const signInErrors = {
  CredentialsSignin: "E-mail or password is incorrect.",
  RateLimited: "Too many sign-in attempts. Wait a few minutes, then try again.",
} as const;
