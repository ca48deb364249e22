// Benchmark (npm run bench:sim): simulated hours per wall second for a 3-chiller site at 1 s steps.
// Target ≥ 10 000× real time (≈ 2.8 simulated hours per wall second).
import { runScenario, threeChillerLayout } from "@/simulator";

const layout = threeChillerLayout();
const durationS = 24 * 3600;

function bench(label: string, sampleEveryS: number): number {
  const t0 = performance.now();
  let readings = 0;
  for (const s of runScenario({
    scenario: "normal-day",
    seed: 1,
    startMs: Date.UTC(2026, 5, 1),
    durationS,
    stepS: 1,
    sampleEveryS,
    layout,
  }))
    readings += s.readings.length;
  const wallS = (performance.now() - t0) / 1000;
  const factor = durationS / wallS;
  console.log(
    `${label}: ${durationS / 3600} simulated h in ${wallS.toFixed(2)} s wall → ${(factor / 3600).toFixed(1)} simulated h per wall second (${Math.round(factor).toLocaleString("en-US")}× real time), ${readings.toLocaleString("en-US")} readings`,
  );
  return factor;
}

bench("warm-up run", 60);
const withReadings = bench("3 chillers, 1 s steps, readings every 10 s", 10);
const sparse = bench("3 chillers, 1 s steps, readings every 60 s", 60);
const target = 10_000;
console.log(
  `target ${target.toLocaleString("en-US")}× real time: ${Math.min(withReadings, sparse) >= target ? "met" : "NOT met"}`,
);
