import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { migrateDb, openDb } from "@/db/client";
import { resolveAuthSecret } from "@/lib/server/secret";

// The database (password hashes, every site's data) and the session-signing secret are the
// owner's alone: folder 0700, files 0600 (chmod(2) modes; the process umask, commonly 022, would
// otherwise leave them readable by every local user).

const mode = (file: string) => fs.statSync(file).mode & 0o777;
const tmp = () => fs.mkdtempSync(path.join(os.tmpdir(), "liftline-modes-"));

describe("file modes", () => {
  it("creates the data folder 0700 and the database, WAL and SHM files 0600", () => {
    const previous = process.umask(0o022);
    try {
      const dir = path.join(tmp(), "data");
      const file = path.join(dir, "liftline.db");
      const db = openDb(file);
      migrateDb(db); // writes, so the WAL and SHM exist
      expect(mode(dir)).toBe(0o700);
      for (const f of [file, `${file}-wal`, `${file}-shm`]) expect([f, mode(f)]).toEqual([f, 0o600]);
      db.$client.close();
    } finally {
      process.umask(previous);
    }
  });

  it("takes group and other access away from a database made before", () => {
    const file = path.join(tmp(), "old.db");
    fs.writeFileSync(file, "", { mode: 0o644 });
    fs.chmodSync(file, 0o644);
    const db = openDb(file);
    expect(mode(file)).toBe(0o600);
    db.$client.close();
  });

  it("writes the generated auth secret 0600 in a 0700 folder, and tightens an old one", () => {
    const dir = path.join(tmp(), "data");
    resolveAuthSecret(undefined, dir);
    expect(mode(dir)).toBe(0o700);
    expect(mode(path.join(dir, "auth-secret"))).toBe(0o600);

    fs.chmodSync(path.join(dir, "auth-secret"), 0o644);
    resolveAuthSecret(undefined, dir);
    expect(mode(path.join(dir, "auth-secret"))).toBe(0o600);
  });
});
