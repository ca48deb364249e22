import Database from "better-sqlite3";
import { describe, expect, it } from "vitest";
import { migrateDb, openDb } from "@/db/client";
import { listMail } from "@/db/queries/oncall";
import { seedDemo } from "@/db/seed/demo";
import type { Mailer } from "@/lib/server/mail";
import { STORAGE_EPISODE_QUIET_MS, startStorageAlarm } from "@/lib/server/storage-alarm";
import { createStorageHealth, storageFailure } from "@/lib/server/storage-health";

// Which errors mean "the database cannot be written", and the episode they start. Codes and
// messages are SQLite's (result codes: https://www.sqlite.org/rescode.html — SQLITE_FULL 13
// "database or disk is full", SQLITE_IOERR 10 and its extended codes "disk I/O error",
// SQLITE_READONLY 8 "attempt to write a readonly database") and POSIX's ENOSPC (write(2)).

/** A real SQLITE_FULL: SQLite refuses to grow a database past max_page_count, as a full disk does. */
function realFullError(): unknown {
  const sqlite = new Database(":memory:");
  sqlite.exec("create table t (b blob)");
  sqlite.pragma("max_page_count = 1"); // raised to the current size: no page can be added
  try {
    sqlite.prepare("insert into t values (randomblob(100000))").run();
  } catch (err) {
    return err;
  } finally {
    sqlite.close();
  }
  throw new Error("the insert should have failed");
}

describe("storageFailure", () => {
  it("recognizes SQLite's own full-disk error", () => {
    const err = realFullError() as { code: string; message: string };
    expect(err.code).toBe("SQLITE_FULL");
    expect(storageFailure(err)).toEqual({ kind: "full", reason: "SQLITE_FULL: database or disk is full" });
  });

  it("recognizes I/O and read-only errors by code, and ENOSPC", () => {
    const withCode = (code: string, message: string) => Object.assign(new Error(message), { code });
    expect(storageFailure(withCode("SQLITE_IOERR_WRITE", "disk I/O error"))?.kind).toBe("io");
    expect(storageFailure(withCode("SQLITE_READONLY", "attempt to write a readonly database"))?.kind).toBe("readonly");
    expect(storageFailure(withCode("ENOSPC", "ENOSPC: no space left on device, write"))?.kind).toBe("full");
  });

  it("follows a wrapper's cause (drizzle's query error) and reads the worker's error text", () => {
    const wrapped = new Error("Failed query: insert into ...", { cause: realFullError() });
    expect(storageFailure(wrapped)?.kind).toBe("full");
    expect(storageFailure("SqliteError: database or disk is full")?.kind).toBe("full");
  });

  it("leaves other database errors alone", () => {
    const constraint = Object.assign(new Error("UNIQUE constraint failed: users.email"), {
      code: "SQLITE_CONSTRAINT_UNIQUE",
    });
    expect(storageFailure(constraint)).toBeNull();
    expect(storageFailure(Object.assign(new Error("database is locked"), { code: "SQLITE_BUSY" }))).toBeNull();
    expect(storageFailure(new Error("Something else"))).toBeNull();
  });
});

describe("storage health", () => {
  it("starts an episode on the first failure and ends it on a write after the recovery time", () => {
    let now = 1_000_000;
    const seen: Array<string | null> = [];
    const health = createStorageHealth({ clock: () => now, recoveryMs: 30_000, log: () => {} });
    health.subscribe((p) => seen.push(p ? p.where : null));

    expect(health.report(new Error("not storage"), "api")).toBe(false);
    expect(health.problem()).toBeNull();
    expect(health.report(realFullError(), "ingest")).toBe(true);
    now += 5_000;
    expect(health.report(realFullError(), "api POST /api/alarms/a/notes")).toBe(true);
    expect(health.problem()).toMatchObject({ kind: "full", where: "ingest", sinceMs: 1_000_000, lastFailureMs: now });

    // A small write that still fits does not end it while failures keep coming.
    now += 10_000;
    health.ok();
    expect(health.problem()).not.toBeNull();
    now += 30_000;
    health.ok();
    expect(health.problem()).toBeNull();
    expect(seen).toEqual(["ingest", null]);
  });
});

describe("storage alarm e-mail", () => {
  it("mails every admin once per episode, and not again when the disk flips back within the quiet time", async () => {
    const db = openDb(":memory:");
    migrateDb(db);
    seedDemo(db, "unit-test-password");
    const sent: Array<{ to: string; subject: string; text: string }> = [];
    const mailer: Mailer = {
      send: async (m) => void sent.push(m),
      close: async () => {},
      sinkPort: null,
      held: () => [],
      storeHeld: () => {},
    };
    let now = 5_000_000;
    const health = createStorageHealth({ clock: () => now, recoveryMs: 0, log: () => {} });
    startStorageAlarm({ db, health, mailer, publicUrl: "http://liftline.test", log: () => {}, clock: () => now });

    health.report(realFullError(), "ingest");
    health.report(realFullError(), "ingest");
    await new Promise((r) => setTimeout(r, 10));
    const admins = db.$client.prepare("select email from users where role = 'admin' and disabled = 0").pluck().all();
    expect(sent.map((m) => m.to).sort()).toEqual([...admins].sort());
    expect(sent[0].subject).toBe("[Liftline] The server cannot save: disk full");
    expect(sent[0].text).toContain("SQLITE_FULL: database or disk is full");

    // Cleared, then full again a minute later: the same episode as far as mail goes.
    now += 1_000;
    health.ok();
    now += 60_000;
    health.report(realFullError(), "ingest");
    await new Promise((r) => setTimeout(r, 10));
    expect(sent).toHaveLength(admins.length);

    // Full again long after it cleared: a new episode, a new e-mail.
    health.ok();
    now += STORAGE_EPISODE_QUIET_MS + 1;
    health.report(realFullError(), "ingest");
    await new Promise((r) => setTimeout(r, 10));
    expect(sent).toHaveLength(2 * admins.length);
    expect(listMail(db)).toEqual([]); // this mailer is not the sink
    db.$client.close();
  });
});
