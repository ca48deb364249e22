import type { Db } from "@/db/client";
import { peekAccountLink } from "@/db/queries/people";
import type { AccountLinkStatusDto } from "@/lib/dto/people";
import { ACCOUNT_LINK_TOKEN_PATTERN } from "@/lib/schemas/people";

/** Whether an e-mailed link may set a password now, without its secrets; for the API and the pages. */
export function accountLinkStatus(db: Db, token: string, nowMs = Date.now()): AccountLinkStatusDto {
  const link = ACCOUNT_LINK_TOKEN_PATTERN.test(token)
    ? peekAccountLink(db, token, nowMs)
    : ({ ok: false, reason: "unknown" } as const);
  return link.ok
    ? { valid: true, purpose: link.purpose, email: link.email, expiresAt: new Date(link.expiresAtMs).toISOString() }
    : { valid: false, reason: link.reason };
}
