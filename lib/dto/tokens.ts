import type { TokenScope } from "@/lib/auth/viewer";

export interface ApiTokenDto {
  id: string;
  name: string;
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
  /** Refused from this moment on; null when the token does not expire. */
  expiresAt: string | null;
  /** What the token may do (lib/auth/viewer.ts); never more than its owner's role. */
  scope: TokenScope;
}
