import { equipmentOf, runScenario, siteLayouts } from "@/simulator";
import { createSiteMonitor, defaultRuleSettings } from "@/lib/rules";
import { siteOfLayout } from "../helpers/rule-replay";
const [scenario, layoutName, hours, ...rules] = process.argv.slice(2);
const layout = siteLayouts[layoutName];
const site = siteOfLayout(layout);
void equipmentOf;
const monitor = createSiteMonitor({ site, settings: defaultRuleSettings });
const T = Date.UTC(2025, 6, 1, 14);
const last = new Map<string, Record<string, unknown>>();
for (const sample of runScenario({ scenario, seed: 1, startMs: T, durationS: Number(hours) * 3600, sampleEveryS: 10, layout })) {
  for (const r of sample.readings) { const m = last.get(r.equipment) ?? {}; m[r.quantity] = r.value; last.set(r.equipment, m); }
  monitor.ingest(sample.readings);
  const ev = monitor.evaluate(sample.tsMs);
  for (const c of ev.conditions) {
    if (!rules.includes(c.ruleId)) continue;
    const key = `${c.ruleId}:${c.equipment}`;
    const raw = (c as any).rawActive;
    const prev = (last.get("__" + key) as any)?.raw;
    if (raw !== prev) {
      const ch = last.get(c.equipment) ?? {};
      console.log(((sample.tsMs - T) / 60000).toFixed(1), key, raw ? "ON " : "off", JSON.stringify({ run: ch.run_status, why: ch.chiller_stop_reason, alarm: ch.chiller_alarm, inh: ch.restart_inhibit_time_left, cw: ch.condenser_water_entering_temp, chw: ch.chilled_water_entering_temp, cp: ch.condenser_refrigerant_pressure, ep: ch.evaporator_refrigerant_pressure }), JSON.stringify(c.numbers), raw ? c.advice[0]?.slice(0, 50) : "");
      last.set("__" + key, { raw });
    }
  }
}
