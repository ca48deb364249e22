// The password policy for people's accounts (OWASP ASVS 5.0 §6.2): long enough, long ones
// allowed, no composition rules, and not guessable: not a common password, not repetitive or
// sequential (NIST SP 800-63B §3.1.1.2), not the demo password, not built on the e-mail address.
// Pure: the caller passes the common-passwords list (lib/auth/common-passwords.ts).

/** ASVS 5.0 6.2.1 asks for at least 8 and recommends 15; 12 is this project's choice. */
export const PASSWORD_MIN_LENGTH = 12;
/** ASVS 5.0 6.2.9: at least 64 must be allowed. */
export const PASSWORD_MAX_LENGTH = 128;
/** `LIFTLINE_DEMO_PASSWORD`'s default (lib/server/config.ts). */
export const DEFAULT_DEMO_PASSWORD = "liftline-demo";

export type PasswordProblemCode =
  "too_short" | "too_long" | "common" | "repetitive" | "sequential" | "demo_password" | "contains_email";

export interface PasswordProblem {
  code: PasswordProblemCode;
  message: string;
}

export interface PasswordContext {
  /** Lower-case common passwords (ASVS 5.0 6.2.4). */
  commonPasswords: ReadonlySet<string>;
  /** The account's e-mail address: its local part may not appear in the password (ASVS 5.0 6.2.11). */
  email?: string;
  /** The demo accounts' password, known to everyone who saw a demo. */
  demoPassword?: string;
}

/** Every reason the password is refused; empty when it is acceptable. */
export function passwordProblems(password: string, context: PasswordContext): PasswordProblem[] {
  // Lengths count Unicode code points (NIST SP 800-63B §3.1.1.2), not UTF-16 units.
  const chars = [...password];
  const problems: PasswordProblem[] = [];
  if (chars.length < PASSWORD_MIN_LENGTH)
    problems.push({ code: "too_short", message: `Use at least ${PASSWORD_MIN_LENGTH} characters.` });
  if (chars.length > PASSWORD_MAX_LENGTH)
    problems.push({ code: "too_long", message: `Use at most ${PASSWORD_MAX_LENGTH} characters.` });
  const lower = password.toLowerCase();
  if (context.commonPasswords.has(lower))
    problems.push({ code: "common", message: "That is one of the most common passwords; choose another." });
  if (isRepetitive(chars))
    problems.push({ code: "repetitive", message: "A password that repeats the same characters is easy to guess." });
  if (isSequential(chars))
    problems.push({ code: "sequential", message: "A run of consecutive characters is easy to guess." });
  if (context.demoPassword && lower === context.demoPassword.toLowerCase())
    problems.push({ code: "demo_password", message: "That is the demo password; choose your own." });
  const local = context.email?.split("@")[0]?.toLowerCase() ?? "";
  // One or two letters would refuse half of all passwords for nothing.
  if (local.length >= 3 && lower.includes(local))
    problems.push({ code: "contains_email", message: "Do not build the password on the e-mail address." });
  return problems;
}

/** The password is one shorter string said again and again ("aaaaaaaaaaaa", "passwordpassword"). */
function isRepetitive(chars: readonly string[]): boolean {
  const n = chars.length;
  for (let unit = 1; unit <= n / 2; unit++) {
    if (n % unit !== 0) continue;
    let repeats = true;
    for (let i = unit; i < n && repeats; i++) repeats = chars[i] === chars[i - unit];
    if (repeats) return true;
  }
  return false;
}

/** The whole password runs up or down by one ("abcdefghijkl", "123456789012", with 9 → 0 wrapping). */
function isSequential(chars: readonly string[]): boolean {
  if (chars.length < 3) return false;
  const step = (a: string, b: string) => {
    const d = b.codePointAt(0)! - a.codePointAt(0)!;
    if (/\d/.test(a) && /\d/.test(b)) return ((d % 10) + 10) % 10 === 1 ? 1 : ((d % 10) + 10) % 10 === 9 ? -1 : 0;
    return d === 1 || d === -1 ? d : 0;
  };
  const first = step(chars[0].toLowerCase(), chars[1].toLowerCase());
  if (first === 0) return false;
  for (let i = 2; i < chars.length; i++)
    if (step(chars[i - 1].toLowerCase(), chars[i].toLowerCase()) !== first) return false;
  return true;
}
