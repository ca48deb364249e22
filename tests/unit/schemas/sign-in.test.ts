import { describe, expect, it } from "vitest";
import { parseSignInError, signInErrorMessage, slowedError } from "@/lib/schemas/sign-in";

describe("sign-in error codes", () => {
  it("carry the seconds to wait for a slowed account or address, and read back", () => {
    expect(slowedError("RateLimited", 29.2)).toBe("RateLimited:30");
    expect(parseSignInError("RateLimited:30")).toEqual({ code: "RateLimited", retryAfterS: 30 });
    expect(parseSignInError("AddressLimited:600")).toEqual({ code: "AddressLimited", retryAfterS: 600 });
    expect(signInErrorMessage("RateLimited:30")).toContain("30 seconds");
    expect(signInErrorMessage("RateLimited:600")).toContain("10 minutes");
  });

  it("shows anything else as the plain wrong-password message", () => {
    for (const e of ["CredentialsSignin", "Configuration", "RateLimited:abc", "<script>"])
      expect(signInErrorMessage(e)).toBe("E-mail or password is incorrect.");
  });
});
