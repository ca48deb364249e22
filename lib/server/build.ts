import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";

// Inputs of a production build; a change to any of them makes `npm start` rebuild.
const SOURCES = ["app", "components", "lib", "db", "public", "next.config.mjs", "postcss.config.mjs", "package-lock.json", "tsconfig.json"];

function newestMtimeMs(entry: string): number {
  let stat: fs.Stats;
  try {
    stat = fs.statSync(entry);
  } catch {
    return 0;
  }
  if (!stat.isDirectory()) return stat.mtimeMs;
  let newest = stat.mtimeMs;
  for (const child of fs.readdirSync(entry)) newest = Math.max(newest, newestMtimeMs(path.join(entry, child)));
  return newest;
}

export function buildIsStale(dir: string): boolean {
  let builtAt: number;
  try {
    builtAt = fs.statSync(path.join(dir, ".next", "BUILD_ID")).mtimeMs;
  } catch {
    return true;
  }
  return SOURCES.some((s) => newestMtimeMs(path.join(dir, s)) > builtAt);
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
