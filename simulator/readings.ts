// What the plant's sensors and controllers report: state → canonical readings (SI), with seeded sensor noise.
import type { QuantityKey } from "@/lib/quantities";
import { condPressureKPa, evapPressureKPa, restartInhibitLeftS } from "./chiller";
import { ahuTag, chwPumpTag, cwPumpTag, towerTag, weatherStationTag } from "./layout";
import type { Rng } from "./prng";
import type { PlantState } from "./state";

export interface CanonicalReading {
  tsMs: number;
  equipment: string;
  quantity: QuantityKey;
  value: number | boolean | string;
}

/** Sensor noise, 1σ in canonical units (assumed: typical thermistor / transducer scatter). */
const noise = { tempK: 0.03, pressKPa: 0.4, flowFrac: 0.003, powerFrac: 0.003, dpFrac: 0.005 };

export function plantReadings(s: PlantState, tsMs: number, rng: Rng): CanonicalReading[] {
  const out: CanonicalReading[] = [];
  const add = (equipment: string, quantity: QuantityKey, value: number | boolean | string) =>
    out.push({ tsMs, equipment, quantity, value });
  const temp = (v: number) => v + noise.tempK * rng.normal();
  const frac = (v: number, f: number) => v * (1 + f * rng.normal());

  s.chillers.forEach((c, i) => {
    const p = s.params.chillers[i];
    const tag = p.tag;
    add(tag, "chilled_water_entering_temp", temp(c.chwInC));
    add(tag, "chilled_water_leaving_temp", temp(c.chwOutC));
    add(tag, "chilled_water_leaving_temp_setpoint", c.setpointC);
    add(tag, "chilled_water_flow", frac(c.chwFlowLps, noise.flowFrac));
    add(tag, "evaporator_water_dp", frac(p.evapDpDesignKPa * (c.chwFlowLps / p.chwDesignLps) ** 2, noise.dpFrac));
    // On a stopped condenser loop the sensor sits in a dead leg and reads the pipe, not the basin.
    add(tag, "condenser_water_entering_temp", temp(c.cwInSensorC));
    add(tag, "condenser_water_leaving_temp", temp(c.cwOutC));
    add(tag, "condenser_water_flow", frac(c.cwFlowLps, noise.flowFrac));
    add(tag, "condenser_water_dp", frac(p.condDpDesignKPa * (c.cwFlowLps / p.cwDesignLps) ** 2, noise.dpFrac));
    add(tag, "evaporator_refrigerant_pressure", evapPressureKPa(p, c) + noise.pressKPa * rng.normal());
    add(tag, "evaporator_saturated_temp", temp(c.evapSatC));
    add(tag, "condenser_refrigerant_pressure", condPressureKPa(p, c) + noise.pressKPa * rng.normal());
    add(tag, "condenser_saturated_temp", temp(c.condSatC));
    add(tag, "compressor_speed", c.speedPct);
    add(tag, "inlet_guide_vane_position", c.igvPct);
    add(tag, "compressor_power", frac(c.compKW, noise.powerFrac));
    add(tag, "drive_temp", temp(c.driveC));
    add(tag, "drive_fault", c.driveFaultText !== "");
    add(tag, "run_status", c.running);
    add(tag, "run_enable_command", c.enabled);
    add(tag, "chiller_alarm", c.alarmLatched);
    add(tag, "fault_text", c.alarmLatched ? c.alarmText : c.driveFaultText || "none");
    add(tag, "chiller_stop_reason", c.running ? "running" : c.stopReason);
    add(tag, "restart_inhibit_time_left", Math.ceil(restartInhibitLeftS(c, s.tS)));
    add(tag, "start_to_start_timer_setting", c.startToStartS);
    add(tag, "stop_to_start_timer_setting", c.stopToStartS);
  });

  const t = s.tower;
  add(towerTag, "condenser_water_entering_temp", temp(t.flowLps > 0 ? t.inC : s.basinC));
  add(towerTag, "condenser_water_leaving_temp", temp(s.basinC));
  add(towerTag, "condenser_water_temp_setpoint", t.setpointC);
  add(towerTag, "fan_drive_mode", t.mode);
  add(towerTag, "fan_speed", 100 * t.speedFrac);
  add(towerTag, "fan_status", t.speedFrac > 0.01);
  add(towerTag, "fan_drive_fault", t.fault);
  add(towerTag, "fan_drive_frequency", 60 * t.speedFrac);
  add(towerTag, "fault_text", t.fault ? t.faultText : "none");
  if (s.params.towerBypass) add(towerTag, "tower_bypass_valve_position", t.bypassPct);

  const pump = (tag: string, pm: PlantState["chwPumps"][number]) => {
    add(tag, "pump_status", pm.running);
    add(tag, "pump_speed", pm.speedPct);
    add(tag, "pump_run_command", pm.commanded);
    add(tag, "pump_fault", pm.tripped);
  };
  s.chwPumps.forEach((pm, i) => pump(chwPumpTag(i), pm));
  s.cwPumps.forEach((pm, i) => pump(cwPumpTag(i), pm));
  s.ahus.forEach((a, i) => {
    add(ahuTag(i), "run_status", a.running);
    add(ahuTag(i), "chilled_water_valve_position", a.valvePct);
  });
  add(weatherStationTag, "outdoor_air_temp", temp(s.dryBulbC));
  add(weatherStationTag, "outdoor_air_humidity", s.rhPct);
  add(weatherStationTag, "outdoor_wet_bulb_temp", s.wetBulbC);
  return out;
}
