import "server-only";
import { createHash, randomBytes, randomUUID } from "node:crypto";
import { and, desc, eq, gt, isNull, or } from "drizzle-orm";
import type { Db } from "../client";
import { apiTokens, users } from "../schema";
import type { TokenScope, Viewer } from "@/lib/auth/viewer";
import { writeAudit } from "./audit";
import type { ApiTokenDto } from "@/lib/dto/tokens";
import { viewerColumns } from "./users";

export const TOKEN_PREFIX = "llt_";

// Tokens carry 256 random bits, so a fast hash is enough: there is nothing to brute-force.
export function hashToken(secret: string): string {
  return createHash("sha256").update(secret).digest("hex");
}

const dtoColumns = {
  id: apiTokens.id,
  name: apiTokens.name,
  prefix: apiTokens.prefix,
  createdAt: apiTokens.createdAt,
  lastUsedAt: apiTokens.lastUsedAt,
  revokedAt: apiTokens.revokedAt,
  expiresAt: apiTokens.expiresAt,
  scope: apiTokens.scope,
};

type DtoRow = {
  id: string;
  name: string;
  prefix: string;
  createdAt: Date;
  lastUsedAt: Date | null;
  revokedAt: Date | null;
  expiresAt: Date | null;
  scope: TokenScope;
};

function toDto(row: DtoRow): ApiTokenDto {
  return {
    id: row.id,
    name: row.name,
    prefix: row.prefix,
    createdAt: row.createdAt.toISOString(),
    lastUsedAt: row.lastUsedAt?.toISOString() ?? null,
    revokedAt: row.revokedAt?.toISOString() ?? null,
    expiresAt: row.expiresAt?.toISOString() ?? null,
    scope: row.scope,
  };
}

export function listTokens(db: Db, viewer: Viewer): ApiTokenDto[] {
  return db
    .select(dtoColumns)
    .from(apiTokens)
    .where(eq(apiTokens.userId, viewer.userId))
    .orderBy(desc(apiTokens.createdAt))
    .all()
    .map(toDto);
}

/** What the audit keeps of a token: never its secret or hash. */
const audited = (t: ApiTokenDto) => ({ name: t.name, prefix: t.prefix, scope: t.scope, expiresAt: t.expiresAt });

/**
 * Returns the secret exactly once; only its hash is stored. A token without `expiresAt` does not expire.
 * The caller checks that `scope` is within what the viewer may grant (lib/server/tokens.ts).
 */
export function createToken(
  db: Db,
  viewer: Viewer,
  name: string,
  expiresAt: Date | null = null,
  scope: TokenScope = "read",
): { token: string; apiToken: ApiTokenDto } {
  const token = TOKEN_PREFIX + randomBytes(32).toString("base64url");
  const id = randomUUID();
  return db.transaction(
    (tx) => {
      tx.insert(apiTokens)
        .values({
          id,
          userId: viewer.userId,
          name,
          tokenHash: hashToken(token),
          prefix: token.slice(0, 10),
          expiresAt,
          scope,
        })
        .run();
      const apiToken = toDto(tx.select(dtoColumns).from(apiTokens).where(eq(apiTokens.id, id)).get()!);
      writeAudit(tx, viewer, {
        action: "create",
        entityType: "token",
        entityId: id,
        summary: `API token "${name}" created with scope ${scope}`,
        before: null,
        after: audited(apiToken),
      });
      return { token, apiToken };
    },
    { behavior: "immediate" },
  );
}

/** Revokes one of the viewer's own tokens; false when there is no such token of theirs. */
export function revokeToken(db: Db, viewer: Viewer, id: string): boolean {
  return db.transaction(
    (tx) => {
      const own = and(eq(apiTokens.id, id), eq(apiTokens.userId, viewer.userId), isNull(apiTokens.revokedAt));
      const before = tx.select(dtoColumns).from(apiTokens).where(own).get();
      if (!before) return false;
      tx.update(apiTokens).set({ revokedAt: new Date() }).where(own).run();
      writeAudit(tx, viewer, {
        action: "revoke",
        entityType: "token",
        entityId: id,
        summary: `API token "${before.name}" revoked`,
        before: audited(toDto(before)),
        after: { ...audited(toDto(before)), revoked: true },
      });
      return true;
    },
    { behavior: "immediate" },
  );
}

/**
 * The viewer a bearer token acts as: its owner, narrowed to the token's scope (`tokenScope`); records its
 * use. Revoked or expired, or its owner disabled or not yet past the invitation: null.
 */
export function viewerForToken(db: Db, token: string): Viewer | null {
  if (!token.startsWith(TOKEN_PREFIX)) return null;
  const row = db
    .select({
      tokenId: apiTokens.id,
      tokenScope: apiTokens.scope,
      ...viewerColumns,
      disabled: users.disabled,
    })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(
      and(
        eq(apiTokens.tokenHash, hashToken(token)),
        isNull(apiTokens.revokedAt),
        or(isNull(apiTokens.expiresAt), gt(apiTokens.expiresAt, new Date())),
      ),
    )
    .get();
  if (!row || row.disabled) return null;
  db.update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.id, row.tokenId)).run();
  const { tokenId: _t, disabled: _d, ...viewer } = row;
  return viewer;
}
