import type { Db } from "@/db/client";
import { findAccountContact } from "@/db/queries/users";
import { getRuntime } from "./runtime";

// Telling an account's owner that its sign-ins are being slowed (OWASP ASVS 5.0 §6.3.5: users
// are notified of suspicious authentication attempts). Sent once when the slow-down starts,
// through the server's mail path; never awaited by the sign-in, whose answer must not depend on it.

function waitWords(seconds: number): string {
  return seconds < 90 ? `${seconds} seconds` : `${Math.ceil(seconds / 60)} minutes`;
}

export function notifySignInSlowed(
  db: Db,
  account: string,
  address: string,
  retryAfterS: number,
  log: (line: string) => void = console.log,
): void {
  const contact = findAccountContact(db, account);
  // A made-up e-mail is slowed like a real one, but there is nobody to tell.
  if (!contact) return;
  const runtime = getRuntime();
  const line = `[auth] sign-ins for ${contact.email} slowed after repeated failures from ${address}`;
  if (!runtime) return log(`${line}; mail is not available in this process, owner not notified`);
  const text = [
    `Hello ${contact.name},`,
    "",
    `Several sign-ins to your Liftline account failed in a row, the last from the address ${address} at ${new Date().toISOString()}.`,
    `For now each further attempt must wait (${waitWords(retryAfterS)} at first, longer after each failure). Your account is not locked: with the right password you can sign in after the wait.`,
    "",
    "If this was you, there is nothing to do. If it was not, someone may be guessing your password: tell your administrator.",
  ].join("\n");
  runtime
    .sendMail({ to: contact.email, subject: "Liftline: repeated failed sign-ins to your account", text })
    .then(() => log(`${line}; owner notified by e-mail`))
    .catch((err: unknown) => log(`${line}; the notice could not be sent: ${err instanceof Error ? err.message : err}`));
}
