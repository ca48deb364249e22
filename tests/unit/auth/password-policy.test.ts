import { describe, expect, it } from "vitest";
import { COMMON_PASSWORDS } from "@/lib/auth/common-passwords";
import { passwordProblems, PASSWORD_MAX_LENGTH } from "@/lib/auth/password-policy";

// Checks against OWASP ASVS 5.0 §6.2 (Password Security) and NIST SP 800-63B §3.1.1.2
// (Password Verifiers), each named beside its case.

const context = {
  commonPasswords: COMMON_PASSWORDS,
  email: "jordan.reyes@tallgrass.example",
  demoPassword: "liftline-demo",
};
const codes = (password: string) => passwordProblems(password, context).map((p) => p.code);

describe("password policy", () => {
  it("needs 12 characters, counted as Unicode code points (ASVS 5.0 6.2.1; NIST 800-63B §3.1.1.2)", () => {
    expect(codes("chiller-run")).toEqual(["too_short"]); // 11
    expect(codes("chiller-runs")).toEqual([]); // 12
    // 12 code points, 24 UTF-16 units: long enough; 11 of them are not.
    expect(codes("🔥💧🌀🏢🚒🧊🌊🌞🌙🌲🌵🍀")).toEqual([]);
    expect(codes("Kältemittel")).toEqual(["too_short"]);
  });

  it("allows at least 64 characters (ASVS 5.0 6.2.9), up to its maximum", () => {
    const long = "condenser water leaving at thirty one degrees, tower fan on auto ".repeat(2);
    expect(long.length).toBeGreaterThanOrEqual(64);
    expect(codes(long.slice(0, 64))).toEqual([]);
    expect(codes("x".repeat(PASSWORD_MAX_LENGTH - 20) + "twenty chars to end.")).toEqual([]);
    expect(codes("y".repeat(PASSWORD_MAX_LENGTH - 20) + "twenty-one chars end.")).toContain("too_long");
  });

  it("has no composition rules: lower-case words and spaces are fine (ASVS 5.0 6.2.5)", () => {
    expect(codes("correct horse battery staple")).toEqual([]); // the passphrase of xkcd 936
    expect(codes("tower fan drive tripped at noon")).toEqual([]);
  });

  it("refuses the most common passwords of 12 characters or more (ASVS 5.0 6.2.4)", () => {
    // Keyboard walks from the list (zxcvbn's frequency lists, as shipped by popular-passwords).
    for (const p of ["1q2w3e4r5t6y", "qwertyuiop12", "1qaz2wsx3edc", "qazwsxedcrfv", "administrator"])
      expect([p, codes(p)]).toEqual([p, ["common"]]);
    expect([...COMMON_PASSWORDS].filter((p) => p.length >= 12).length).toBeGreaterThanOrEqual(3000);
    expect(codes("1Q2W3E4R5T6Y")).toEqual(["common"]); // the list is compared case-blind
  });

  it("refuses repetitive and sequential characters (NIST 800-63B §3.1.1.2: 'aaaaaa', '1234abcd')", () => {
    expect(codes("aaaaaaaaaaaa")).toEqual(["repetitive"]);
    expect(codes("passwordpassword")).toEqual(["repetitive"]);
    expect(codes("abcabcabcabc")).toEqual(["repetitive"]);
    expect(codes("123456789012")).toEqual(["sequential"]);
    expect(codes("abcdefghijklm")).toEqual(["sequential"]);
    expect(codes("zyxwvutsrqpo")).toEqual(["sequential"]);
  });

  it("refuses the demo password and the e-mail's local part (ASVS 5.0 6.2.11, context-specific words)", () => {
    expect(codes("liftline-demo")).toEqual(["demo_password"]);
    expect(codes("LIFTLINE-DEMO")).toEqual(["demo_password"]);
    expect(codes("jordan.reyes-2026!")).toEqual(["contains_email"]);
    expect(codes("My name is Jordan.Reyes, ok")).toEqual(["contains_email"]);
    // A one- or two-letter local part is not a word to avoid.
    expect(passwordProblems("a rooftop unit hums", { ...context, email: "al@tallgrass.example" })).toEqual([]);
  });
});
