// Prints, per scenario and site layout, when CH-1 tripped and how long after it the loops crossed
// (condenser water to the chillers at or below the chilled-water return, from the model's state),
// plus the closest approach: the figures behind simulator/README.md. Run: npx tsx tests/bench/sim-crossing.ts
import { runPlant, siteLayouts } from "@/simulator";

const scenarioNames =
  process.argv.slice(2).length > 0 ? process.argv.slice(2) : ["power-blip", "condenser-pump-loss", "slow-crossover"];
const startMs = Date.UTC(2026, 5, 1);
const durations: Record<string, number> = { "slow-crossover": 10 * 3600, "mild-day": 24 * 3600 };

for (const scenario of scenarioNames) {
  for (const [site, layout] of Object.entries(siteLayouts)) {
    const durationS = durations[scenario] ?? 3 * 3600;
    let tripS: number | null = null;
    let crossS: number | null = null;
    let minMarginK = Infinity;
    let starts = 0;
    for (const s of runPlant({ scenario, seed: 7, startMs, durationS, stepS: 1, sampleEveryS: 10, layout })) {
      const tS = (s.tsMs - startMs) / 1000;
      for (const e of s.events) {
        if (tripS === null && e.kind === "alarm" && e.equipment === layout.chillers[0].tag)
          tripS = (e.tsMs - startMs) / 1000;
        if (e.kind === "state" && /Compressor started/.test(e.message)) starts++;
      }
      const margin = s.state.basinC - s.state.chwReturnC;
      if (s.readings.length > 0) minMarginK = Math.min(minMarginK, margin);
      if (crossS === null && margin <= 0 && s.readings.length > 0) crossS = tS;
    }
    const fmt = (x: number | null) => (x === null ? "—" : (x / 60).toFixed(1));
    console.log(
      `${scenario.padEnd(20)} ${site.padEnd(15)} trip ${fmt(tripS)} min, crossing ${fmt(crossS)} min, trip→crossing ${
        tripS !== null && crossS !== null ? ((crossS - tripS) / 60).toFixed(1) : "—"
      } min, closest ${((minMarginK * 9) / 5).toFixed(1)} °F, starts ${starts}`,
    );
  }
}
