import { AppError } from "@/lib/errors";
import { unavailableMessage, type StorageFailureKind } from "@/lib/storage-messages";

export type { StorageFailureKind };

// Whether the server can write to its database. Every place that writes reports failures that
// come from the storage itself (disk full, I/O error, read-only file) here, and successful
// commits too; /api/health, the staff banner and the admins' e-mail read the result.

export interface StorageProblem {
  kind: StorageFailureKind;
  /** The error as SQLite or the OS gave it, e.g. "SQLITE_FULL: database or disk is full". */
  reason: string;
  /** Which part of the server saw it first (e.g. "ingest", "api POST /api/alarms/…/notes"). */
  where: string;
  sinceMs: number;
  lastFailureMs: number;
}

export interface StorageHealth {
  /** Marks storage degraded when `err` is a storage failure; true if it was one. */
  report(err: unknown, where: string): boolean;
  /** A write committed: storage works again, once no failure was seen for the recovery time. */
  ok(): void;
  problem(): StorageProblem | null;
  /** Called when an episode starts (a problem) and when it ends (null). */
  subscribe(listener: (problem: StorageProblem | null) => void): () => void;
}

// SQLite result codes (https://www.sqlite.org/rescode.html) and errno ENOSPC (POSIX).
const CODE_KINDS: Array<[RegExp, StorageFailureKind]> = [
  [/^SQLITE_FULL$/, "full"],
  [/^ENOSPC$/, "full"],
  [/^SQLITE_IOERR/, "io"],
  [/^SQLITE_READONLY/, "readonly"],
];

// The worker thread sends errors as text; these are SQLite's own messages for the codes above.
const MESSAGE_KINDS: Array<[RegExp, StorageFailureKind]> = [
  [/database or disk is full|no space left on device|ENOSPC/i, "full"],
  [/disk I\/O error/i, "io"],
  [/attempt to write a readonly database/i, "readonly"],
];

/** The storage failure behind an error (following `cause`, as drizzle wraps SQLite's errors), or null. */
export function storageFailure(err: unknown): { kind: StorageFailureKind; reason: string } | null {
  for (let e: unknown = err, depth = 0; e && depth < 5; depth++) {
    const code = typeof e === "object" && "code" in e && typeof e.code === "string" ? e.code : undefined;
    const message = e instanceof Error ? e.message : typeof e === "string" ? e : "";
    const byCode = code && CODE_KINDS.find(([re]) => re.test(code));
    if (byCode) return { kind: byCode[1], reason: `${code}: ${message}` };
    const byMessage = MESSAGE_KINDS.find(([re]) => re.test(message));
    if (byMessage) return { kind: byMessage[1], reason: code ? `${code}: ${message}` : message };
    e = e instanceof Error ? e.cause : undefined;
  }
  return null;
}

export function storageUnavailable(kind: StorageFailureKind): AppError {
  return new AppError("unavailable", unavailableMessage(kind));
}

/** Default for STORAGE_RECOVERY_S, in ms. */
export const STORAGE_RECOVERY_MS = 30_000;

export function createStorageHealth(
  opts: { clock?: () => number; log?: (line: string) => void; recoveryMs?: number } = {},
): StorageHealth {
  const clock = opts.clock ?? Date.now;
  // A nearly full disk still takes small writes while larger ones fail: storage counts as working
  // again only when a write succeeds this long after the last failure.
  const recoveryMs = opts.recoveryMs ?? STORAGE_RECOVERY_MS;
  const log = opts.log ?? ((line: string) => console.error(line));
  let current: StorageProblem | null = null;
  const listeners = new Set<(problem: StorageProblem | null) => void>();
  const tell = (problem: StorageProblem | null) => {
    for (const listener of listeners) {
      try {
        listener(problem);
      } catch (err) {
        log(`[storage] listener failed: ${String(err)}`);
      }
    }
  };

  return {
    report(err, where) {
      const failure = storageFailure(err);
      if (!failure) return false;
      const now = clock();
      if (current) {
        current.lastFailureMs = now;
        return true;
      }
      current = { ...failure, where, sinceMs: now, lastFailureMs: now };
      log(`[storage] degraded (${where}): ${failure.reason}`);
      tell(current);
      return true;
    },
    ok() {
      if (!current || clock() - current.lastFailureMs < recoveryMs) return;
      log(`[storage] writes succeed again after ${Math.round((clock() - current.sinceMs) / 1000)} s`);
      current = null;
      tell(null);
    },
    problem: () => (current ? { ...current } : null),
    subscribe(listener) {
      listeners.add(listener);
      return () => void listeners.delete(listener);
    },
  };
}
