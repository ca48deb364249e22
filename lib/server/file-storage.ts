import { randomBytes } from "node:crypto";
import fs from "node:fs/promises";
import path from "node:path";
import { loadConfig } from "./config";

// Uploaded photos and PDFs live behind this small interface, so a deployment can later keep them
// in object storage instead of on the server's disk. Keys are random: nothing a user sends
// (a file name, a caption) ever becomes part of a path.

export interface FileStorage {
  put(key: string, bytes: Uint8Array): Promise<void>;
  /** The stored bytes, or null when nothing is stored under the key. */
  get(key: string): Promise<Buffer | null>;
  /** Removes the bytes; removing a missing key is not an error. */
  delete(key: string): Promise<void>;
}

const KEY_PATTERN = /^[0-9a-f]{32}$/;

/** A fresh random storage key (128 bits), never derived from user input. */
export function newStorageKey(): string {
  return randomBytes(16).toString("hex");
}

function checkedKey(key: string): string {
  // A key is only ever one this module made; anything else could name a path outside the folder.
  if (!KEY_PATTERN.test(key)) throw new Error("invalid storage key");
  return key;
}

/**
 * Files on the local disk, one per key, in a folder kept like the database: the folders 0700 and
 * the files 0600, since photos of a customer's plant room are theirs alone.
 */
export function localFileStorage(root: string): FileStorage {
  // Two hex characters of fan-out keep any one folder small after years of uploads.
  const fileFor = (key: string) => path.join(root, checkedKey(key).slice(0, 2), key);
  return {
    async put(key, bytes) {
      const file = fileFor(key);
      await fs.mkdir(path.dirname(file), { recursive: true, mode: 0o700 });
      // Written aside and renamed, so a crash never leaves half a file under a stored key.
      const partial = `${file}.partial`;
      await fs.writeFile(partial, bytes, { mode: 0o600, flag: "wx" });
      await fs.rename(partial, file);
    },
    async get(key) {
      try {
        return await fs.readFile(fileFor(key));
      } catch (err) {
        if ((err as NodeJS.ErrnoException).code === "ENOENT") return null;
        throw err;
      }
    },
    async delete(key) {
      await fs.rm(fileFor(key), { force: true });
    },
  };
}

/** Where uploads go by default: `files/` beside the database (DATABASE_PATH). */
export function defaultFilesDir(databasePath = loadConfig().DATABASE_PATH): string {
  // An in-memory database (tests of queries) has no folder of its own; the working folder's data/ stands in.
  const base = databasePath === ":memory:" ? "data/liftline.db" : databasePath;
  return path.join(path.dirname(path.resolve(base)), "files");
}

const holder = globalThis as { __liftlineFileStorage?: FileStorage };

/** The process's file storage (the route bundles and server.ts share it through globalThis). */
export function fileStorage(): FileStorage {
  return (holder.__liftlineFileStorage ??= localFileStorage(defaultFilesDir()));
}

/** A deployment or a test puts its own storage in place (object storage, a temp folder). */
export function setFileStorage(storage: FileStorage | undefined): void {
  holder.__liftlineFileStorage = storage;
}
