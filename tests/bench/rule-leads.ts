// Prints the warning leads and alarm counts of every scenario at every site layout, run headless
// through the rules on event time: `npx tsx tests/bench/rule-leads.ts [scenario…]`.
import { scenarioNames, siteLayouts } from "@/simulator";
import { crossoverLeadMin, raised, replay } from "../helpers/rule-replay";

const wanted = process.argv.slice(2);
const scenarios = (wanted.length ? wanted : scenarioNames).filter((s) => s !== "fouled-condenser");
const rows: string[][] = [
  [
    "scenario",
    "layout",
    "chiller",
    "crossed at",
    "lead (min)",
    "P1",
    "P2",
    "P3",
    "P4",
    "rules raised (P1/P2)",
    "wall s",
  ],
];
for (const scenario of scenarios)
  for (const layout of Object.keys(siteLayouts)) {
    const r = replay(scenario, { layout });
    const all = raised(r);
    const byP = [1, 2, 3, 4].map((p) => String(all.filter((t) => t.priority === p).length));
    const high = [...new Set(all.filter((t) => t.priority <= 2).map((t) => t.alarmKey))].join(" ");
    for (const [tag, c] of r.chillers) {
      const lead = crossoverLeadMin(r, tag);
      rows.push([
        scenario,
        layout,
        tag,
        c.crossedAtMs === null ? "-" : `${((c.crossedAtMs - Date.UTC(2025, 6, 1, 14)) / 60_000).toFixed(1)} min`,
        lead === null ? "-" : lead.toFixed(1),
        ...byP,
        high || "-",
        (r.wallMs / 1000).toFixed(1),
      ]);
    }
  }
const widths = rows[0].map((_, i) => Math.max(...rows.map((r) => r[i].length)));
for (const r of rows) console.log("| " + r.map((c, i) => c.padEnd(widths[i])).join(" | ") + " |");
