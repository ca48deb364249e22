// `npm test`: type-check, lint, make sure a production build exists, run every vitest
// suite, and end with one plain summary line (`N passed, N failed, N skipped`) computed
// from vitest's JSON results, which CI reads. Exit code is non-zero on any failure.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { buildIfNeeded } from "../lib/server/build";

const root = path.resolve(import.meta.dirname, "..");
const bin = (name: string) => path.join(root, "node_modules", ".bin", name);
const env = { ...process.env, NEXT_TELEMETRY_DISABLED: "1" };

function step(title: string, cmd: string, args: string[]): boolean {
  console.log(`\n== ${title}`);
  const started = Date.now();
  const res = spawnSync(cmd, args, { cwd: root, stdio: "inherit", env });
  const ok = res.status === 0;
  console.log(`== ${title}: ${ok ? "ok" : "FAILED"} (${Math.round((Date.now() - started) / 1000)} s)`);
  return ok;
}

let failedChecks = 0;
let passedChecks = 0;
const count = (ok: boolean) => (ok ? passedChecks++ : failedChecks++);

count(step("type-check (tsc --noEmit)", bin("tsc"), ["--noEmit"]));
count(
  step("lint (eslint)", bin("eslint"), ["--max-warnings", "0", "."]) &&
    step("format (prettier --check)", bin("prettier"), ["--check", "--log-level", "warn", "."]),
);

console.log("\n== production build (only when missing or stale)");
let built = true;
try {
  buildIfNeeded(root, (line) => console.log(line));
} catch (err) {
  built = false;
  console.error(err instanceof Error ? err.message : err);
}
count(built);

// Files that time the server under load run after the rest, with the machine to themselves:
// beside another test file on 2 cores their figures measure the neighbour, not the server.
const ALONE = ["tests/integration/gateway-storm.test.ts", "tests/unit/gateway/pruner.test.ts"];

const extra = process.argv.slice(2);
fs.mkdirSync(path.join(root, "test-results"), { recursive: true });
const runs = [
  { title: "vitest", file: "vitest.json", args: [...ALONE.map((f) => `--exclude=${f}`), ...extra] },
  // With file filters given, the run above already took what was asked for.
  ...(extra.length ? [] : [{ title: "vitest (timed, alone)", file: "vitest-alone.json", args: ALONE }]),
];

let passed = 0;
let failed = 0;
let skipped = 0;
for (const run of runs) {
  const resultsFile = path.join(root, "test-results", run.file);
  fs.rmSync(resultsFile, { force: true });
  step(run.title, bin("vitest"), [
    "run",
    "--reporter=default",
    "--reporter=json",
    `--outputFile.json=${resultsFile}`,
    ...run.args,
  ]);
  try {
    const results = JSON.parse(fs.readFileSync(resultsFile, "utf8")) as {
      numPassedTests: number;
      numFailedTests: number;
      numPendingTests: number;
      numTodoTests: number;
      testResults: Array<{ name: string; status: string; assertionResults: Array<{ status: string }> }>;
    };
    passed += results.numPassedTests;
    // A file that fails outside its tests (an import error, a failing beforeAll) has no failed
    // test of its own; count it once so it cannot pass silently.
    const brokenFiles = results.testResults.filter(
      (f) => f.status === "failed" && !f.assertionResults.some((a) => a.status === "failed"),
    );
    for (const f of brokenFiles) console.log(`failed outside its tests: ${path.relative(root, f.name)}`);
    failed += results.numFailedTests + brokenFiles.length;
    skipped += results.numPendingTests + results.numTodoTests;
  } catch {
    console.error(`${run.title} wrote no results: counting the run as failed`);
    failed += 1;
  }
}

if (failedChecks)
  console.log(`\n${failedChecks} of the type-check / lint / build steps failed (counted as failures below).`);
console.log(`\n(${passedChecks} checks and ${passed} tests passed)`);
console.log(`${passed + passedChecks} passed, ${failed + failedChecks} failed, ${skipped} skipped`);
process.exit(failed + failedChecks > 0 ? 1 : 0);
