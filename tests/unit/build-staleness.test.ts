import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { buildIsStale } from "@/lib/server/build";

// Every folder whose files the production build bundles (route handlers import gateway/ and
// simulator/ code), plus a root config file.
const SOURCES = [
  "app/page.tsx",
  "app/icon.svg",
  "app/api/sites/route.ts",
  "app/api/sites/status.ts",
  "components/board.tsx",
  "lib/units.ts",
  "db/schema.ts",
  "gateway/point-map.ts",
  "gateway/status.ts",
  "simulator/scenarios.ts",
  "simulator/plant.ts",
  "next.config.mjs",
  "package-lock.json",
];
// Written by tools, never bundled: none of these may make the build stale.
const NOT_SOURCES = [
  "node_modules/next/index.js",
  ".next/server/app/page.js",
  ".next-test/dev/server.js",
  "test-results/vitest.json",
  "data/liftline.db",
  "tests/unit/units.test.ts",
];

const HOUR = 3_600_000;
let dir: string;
let builtAt: number;

function write(rel: string) {
  const file = path.join(dir, rel);
  fs.mkdirSync(path.dirname(file), { recursive: true });
  fs.writeFileSync(file, `// ${rel}\n`);
}

/** Sets the mtime of a file or folder. */
function touch(rel: string, ms: number) {
  const t = new Date(ms);
  fs.utimesSync(path.join(dir, rel), t, t);
}

/** Sets every file and folder under dir (except .next/BUILD_ID) to an hour before the build. */
function ageEverything(rel = ".") {
  const abs = path.join(dir, rel);
  if (fs.statSync(abs).isDirectory()) {
    if (path.basename(abs) === ".git") return;
    for (const child of fs.readdirSync(abs)) ageEverything(path.join(rel, child));
  }
  if (rel !== path.join(".next", "BUILD_ID")) touch(rel, builtAt - HOUR);
}

function makeTree(withGit: boolean) {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-build-"));
  for (const rel of [...SOURCES, ...NOT_SOURCES]) write(rel);
  if (withGit) {
    fs.writeFileSync(path.join(dir, ".gitignore"), "node_modules/\n.next/\n.next-test/\ndata/\ntest-results/\n");
    const git = spawnSync("git", ["init", "-q"], { cwd: dir });
    if (git.status !== 0) throw new Error(`git init failed: ${git.stderr}`);
  }
  fs.writeFileSync(path.join(dir, ".next", "BUILD_ID"), "test-build\n");
  builtAt = Date.now() - 60_000;
  touch(".next/BUILD_ID", builtAt);
  ageEverything();
}

const gitAvailable = spawnSync("git", ["--version"]).status === 0;

describe.each([
  { mode: "a folder without git (walks the tree)", withGit: false },
  { mode: "a git working tree (git's file list)", withGit: true },
])("buildIsStale in $mode", ({ withGit }) => {
  beforeEach((ctx) => {
    if (withGit && !gitAvailable) ctx.skip();
    makeTree(withGit);
  });
  afterEach(() => {
    if (dir) fs.rmSync(dir, { recursive: true, force: true });
  });

  it("is false when nothing changed since the build", () => {
    expect(buildIsStale(dir)).toBe(false);
  });

  it("is true when there is no build", () => {
    fs.rmSync(path.join(dir, ".next", "BUILD_ID"));
    expect(buildIsStale(dir)).toBe(true);
  });

  it.each(SOURCES)("is true after %s changes", (rel) => {
    touch(rel, builtAt + 10_000);
    expect(buildIsStale(dir)).toBe(true);
  });

  it.each(["gateway/added.ts", "simulator/added.ts", "app/sites/new-page.tsx"])("is true after %s is added", (rel) => {
    write(rel);
    touch(rel, builtAt + 10_000);
    expect(buildIsStale(dir)).toBe(true);
  });

  it.each(["gateway/point-map.ts", "simulator/scenarios.ts", "app/api/sites/route.ts"])(
    "is true after %s is deleted",
    (rel) => {
      fs.rmSync(path.join(dir, rel));
      touch(path.dirname(rel), builtAt + 10_000);
      expect(buildIsStale(dir)).toBe(true);
    },
  );

  it.each(NOT_SOURCES)("stays false after %s changes", (rel) => {
    touch(rel, builtAt + 10_000);
    touch(path.dirname(rel), builtAt + 10_000);
    expect(buildIsStale(dir)).toBe(false);
  });
});
