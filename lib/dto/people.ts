import type { Role } from "@/lib/auth/viewer";

/** Invited: the person has not set a password yet. */
export type PersonStatus = "invited" | "active" | "disabled";

export interface PersonDto {
  id: string;
  email: string;
  name: string;
  role: Role;
  organizationId: string;
  organizationName: string;
  phone: string | null;
  status: PersonStatus;
  createdAt: string;
}

export interface OrganizationOptionDto {
  id: string;
  name: string;
  kind: "service" | "customer";
}

export interface AccountDto {
  id: string;
  email: string;
  name: string;
  phone: string | null;
  role: Role;
  organizationName: string;
  unitSystem: "ip" | "si";
}

/** What the set-password page may know about a link: no secret, no account details beyond the address. */
export type AccountLinkStatusDto =
  | { valid: true; purpose: "invite" | "reset"; email: string; expiresAt: string }
  | { valid: false; reason: "unknown" | "expired" | "used" };
