export interface ApiTokenDto {
  id: string;
  name: string;
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
  /** Refused from this moment on; null when the token does not expire. */
  expiresAt: string | null;
}
