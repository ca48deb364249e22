import { execFileSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { defaultLayout, runScenario } from "@/simulator";
import { writeCsv } from "@/simulator/csv";

function csv(seed: number): string {
  let out = "";
  writeCsv(
    runScenario({ scenario: "power-blip", seed, startMs: Date.UTC(2026, 0, 1), durationS: 3600 }),
    defaultLayout,
    (c) => (out += c),
    true,
  );
  return out;
}

describe("determinism", () => {
  it("same seed → byte-for-byte identical CSV; another seed → different noise", () => {
    const a = csv(7);
    const b = csv(7);
    expect(a.length).toBeGreaterThan(100_000);
    expect(a === b).toBe(true);
    expect(csv(8) === a).toBe(false);
  });
});

describe("CLI offline", () => {
  const cli = (args: string[]) =>
    execFileSync(process.execPath, ["--import", "tsx", "simulator/cli.ts", ...args], {
      cwd: process.cwd(),
      encoding: "utf8",
      maxBuffer: 64 << 20,
    });

  it("same seed → byte-for-byte identical stdout (with events)", () => {
    const args = [
      "--scenario",
      "power-blip",
      "--offline",
      "--duration",
      "20m",
      "--seed",
      "7",
      "--events",
      "--start",
      "2026-06-01T10:00:00Z",
    ];
    const a = cli(args);
    expect(a.startsWith("ts,point,value,unit\n")).toBe(true);
    expect(a).toMatch(/^# event,2026-06-01T10:10:00.000Z,scenario,-,Utility power sag\/blip/m);
    expect(cli(args) === a).toBe(true);
  }, 30_000);

  it("without --start the run ends at now: no future timestamps", () => {
    const before = Date.now();
    const out = cli(["--scenario", "normal-day", "--offline", "--duration", "10m", "--sample", "60"]);
    const lines = out.trim().split("\n");
    const first = Date.parse(lines[1].split(",")[0]);
    const last = Date.parse(lines.at(-1)!.split(",")[0]);
    expect(last).toBeLessThanOrEqual(Date.now());
    expect(last).toBeGreaterThanOrEqual(before - 2000);
    expect(last - first).toBe(600_000);
  }, 30_000);
});
