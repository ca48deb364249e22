import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";

// The inputs of a production build are the project's files the build can bundle or read. The
// top-level folders below hold outputs, data or tools' files and are never bundled; tests/ is
// left out as well, so editing a test does not make `npm test` rebuild.
const SKIPPED_TOP_FOLDERS = new Set([".git", ".next", ".next-test", "data", "test-results", "coverage", "tests"]);
// Code, styles, config and the static assets `app/` may hold (icons, images, fonts, robots.txt).
const SOURCE_EXTENSIONS = new Set([
  ".ts",
  ".tsx",
  ".js",
  ".jsx",
  ".mjs",
  ".cjs",
  ".mts",
  ".cts",
  ".json",
  ".css",
  ".svg",
  ".png",
  ".jpg",
  ".jpeg",
  ".gif",
  ".webp",
  ".avif",
  ".ico",
  ".woff",
  ".woff2",
  ".ttf",
  ".otf",
  ".txt",
  ".xml",
  ".webmanifest",
]);
// Written by `next build` and `next dev`; git ignores it, the tree walk skips it by name.
const GENERATED_FILES = new Set(["next-env.d.ts"]);

function isSource(rel: string): boolean {
  const parts = rel.split(/[\\/]/);
  if (SKIPPED_TOP_FOLDERS.has(parts[0]) || parts.includes("node_modules")) return false;
  const name = parts[parts.length - 1];
  return !GENERATED_FILES.has(name) && SOURCE_EXTENSIONS.has(path.extname(name).toLowerCase());
}

/** Tracked files plus untracked ones git does not ignore, relative to dir; null when dir is not a git working tree. */
function gitFiles(dir: string): string[] | null {
  if (!fs.existsSync(path.join(dir, ".git"))) return null;
  const res = spawnSync("git", ["ls-files", "-z", "--cached", "--others", "--exclude-standard"], {
    cwd: dir,
    encoding: "utf8",
    maxBuffer: 64 * 1024 * 1024,
  });
  if (res.error || res.status !== 0) return null;
  const files = res.stdout.split("\0").filter(Boolean);
  return files.length > 0 ? files : null;
}

/** Every file under dir, relative to it, without descending into node_modules or the skipped top-level folders. */
function walkFiles(dir: string, rel = ""): string[] {
  let entries: fs.Dirent[];
  try {
    entries = fs.readdirSync(path.join(dir, rel), { withFileTypes: true });
  } catch {
    return [];
  }
  const files: string[] = [];
  for (const e of entries) {
    const child = rel ? path.join(rel, e.name) : e.name;
    if (e.isDirectory()) {
      if (e.name !== "node_modules" && !(rel === "" && SKIPPED_TOP_FOLDERS.has(e.name)))
        files.push(...walkFiles(dir, child));
    } else files.push(child);
  }
  return files;
}

/**
 * The newest mtime among the build's inputs: the source files, and the folders holding them
 * (a folder's mtime moves when a file in it is added, removed or renamed). The project folder
 * itself is left out: creating data/, .next/ or test-results/ changes it.
 */
function newestSourceMtimeMs(dir: string): number {
  const files = (gitFiles(dir) ?? walkFiles(dir)).filter(isSource);
  const folders = new Set<string>();
  for (const f of files)
    for (let d = path.dirname(f); d !== "." && d !== "" && !folders.has(d); d = path.dirname(d)) folders.add(d);
  let newest = 0;
  for (const entry of [...files, ...folders]) {
    try {
      newest = Math.max(newest, fs.statSync(path.join(dir, entry)).mtimeMs);
    } catch {
      // listed by git but deleted in the working tree: its folder's mtime covers it
    }
  }
  return newest;
}

/** True when there is no production build or an input of the build changed after it. */
export function buildIsStale(dir: string): boolean {
  let builtAt: number;
  try {
    builtAt = fs.statSync(path.join(dir, ".next", "BUILD_ID")).mtimeMs;
  } catch {
    return true;
  }
  return newestSourceMtimeMs(dir) > builtAt;
}

/** Runs `next build` when there is no build or the sources changed since the last one. */
export function buildIfNeeded(dir: string, log: (line: string) => void): void {
  if (!buildIsStale(dir)) return;
  log("Building the web app (first start or sources changed; takes a few minutes on a small machine)...");
  const started = Date.now();
  const result = spawnSync(process.execPath, [path.join(dir, "node_modules", "next", "dist", "bin", "next"), "build"], {
    cwd: dir,
    stdio: "inherit",
    env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1", NODE_ENV: "production" },
  });
  if (result.status !== 0) throw new Error(`next build failed (exit ${result.status})`);
  log(`Build finished in ${Math.round((Date.now() - started) / 1000)} s.`);
}
