import type { Db } from "@/db/client";
import { admins } from "@/db/queries/oncall";
import type { Mailer } from "./mail";
import { storageProblemText } from "@/lib/storage-messages";
import type { StorageHealth, StorageProblem } from "./storage-health";

// The system alarm for storage: the admins get one e-mail when the server stops being able to
// write its database (the banner on staff pages reads the same state). Reading the admins works
// on a full disk; the mail itself goes out over SMTP (the local sink holds it in memory).

/** A problem back within this long of the last one is the same episode: a disk at the edge flips with every write. */
export const STORAGE_EPISODE_QUIET_MS = 15 * 60_000;

export function startStorageAlarm(deps: {
  db: Db;
  health: StorageHealth;
  mailer: Mailer;
  publicUrl: string;
  log: (line: string) => void;
  clock?: () => number;
}): () => void {
  const clock = deps.clock ?? Date.now;
  let endedAtMs = -Infinity;
  let mailed = false;

  async function mail(problem: StorageProblem) {
    const to = admins(deps.db);
    if (!to.length) return deps.log("[storage] no admin to e-mail about the storage problem");
    const text = [
      storageProblemText(problem.kind),
      "",
      `What failed: ${problem.reason} (first seen in ${problem.where} at ${new Date(problem.sinceMs).toISOString()}).`,
      "",
      "What to do: free space on the disk that holds the database (or fix what makes it unwritable). Liftline notices on its own when writes succeed again; nothing needs a restart.",
      `Health: ${deps.publicUrl}/api/health`,
      "",
      "You are receiving this as an admin. One e-mail is sent per episode.",
    ].join("\n");
    for (const admin of to) {
      try {
        await deps.mailer.send({
          to: admin.email,
          subject: "[Liftline] The server cannot save: " + kindWords[problem.kind],
          text,
        });
      } catch (err) {
        deps.log(`[storage] could not e-mail ${admin.email}: ${err instanceof Error ? err.message : err}`);
      }
    }
  }

  return deps.health.subscribe((problem) => {
    if (!problem) {
      endedAtMs = clock();
      deps.mailer.storeHeld();
      return;
    }
    if (mailed && problem.sinceMs - endedAtMs < STORAGE_EPISODE_QUIET_MS) return;
    mailed = true;
    void mail(problem).catch((err: unknown) => deps.log(`[storage] alarm e-mail failed: ${String(err)}`));
  });
}

const kindWords: Record<StorageProblem["kind"], string> = {
  full: "disk full",
  io: "disk write error",
  readonly: "database read-only",
};
