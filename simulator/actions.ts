// Applying drill actions to the plant: accept within the controller's limits, refuse with a reason.
import { KPA_PER_PSI } from "@/lib/plant/units";
import { restartInhibitLeftS, driveTripC, condPressureKPa } from "./chiller";
import { timerLimits, type DrillAction } from "./actions-schema";
import type { ModelEvent, PlantState } from "./state";
import { towerTag } from "./layout";

export interface ActionOutcome {
  accepted: boolean;
  reason: string;
}

function describe(a: DrillAction): string {
  switch (a.type) {
    case "set-fan-drive-mode":
      return `set fan drive mode ${a.mode}${a.handHz !== undefined ? ` (${a.handHz} Hz)` : ""}`;
    case "reset-alarm":
      return "reset latched alarm";
    case "set-anti-recycle-timer":
      return `set ${a.timer} timer to ${a.seconds} s`;
    case "set-air-handler":
      return a.run ? "start air handler" : "stop air handler";
    case "set-chiller-enable":
      return a.enabled ? "enable chiller" : "disable chiller";
    case "set-tower-bypass":
      return `set tower bypass valve to ${a.positionPct} %`;
  }
}

/** Apply one drill action to a state copy the caller owns; returns whether it was accepted and why. */
export function applyDrillAction(s: PlantState, a: DrillAction): ActionOutcome {
  const chillerIndex = s.params.chillers.findIndex((c) => c.tag === a.equipment);
  switch (a.type) {
    case "set-fan-drive-mode": {
      if (a.equipment !== towerTag)
        return { accepted: false, reason: `${a.equipment} has no fan drive (tower is ${towerTag})` };
      const t = { ...s.tower };
      t.mode = a.mode;
      if (a.handHz !== undefined) t.handHz = a.handHz;
      s.tower = t;
      return {
        accepted: true,
        reason: t.fault
          ? `mode set to ${a.mode}; drive is faulted (${t.faultText}) and will not run until reset`
          : `mode set to ${a.mode}`,
      };
    }
    case "reset-alarm": {
      if (a.equipment === towerTag) {
        if (!s.tower.fault) return { accepted: false, reason: "no latched fan drive fault" };
        if (s.powerDownUntilS > s.tS) return { accepted: false, reason: "no line power" };
        s.tower = { ...s.tower, fault: false, faultText: "none", rebootAtS: null };
        return { accepted: true, reason: "fan drive fault reset" };
      }
      if (chillerIndex < 0) return { accepted: false, reason: `unknown equipment ${a.equipment}` };
      const c = s.chillers[chillerIndex];
      const p = s.params.chillers[chillerIndex];
      if (!c.alarmLatched) return { accepted: false, reason: "no latched alarm" };
      // The controller refuses a reset while the tripping condition is still present.
      if (c.alarmText === "High condenser pressure" && condPressureKPa(p, c) >= p.highCondTripKPa - 10 * KPA_PER_PSI)
        return { accepted: false, reason: "condenser pressure still within 10 psi of the trip setting" };
      if (c.alarmText === "Drive over-temperature" && c.driveC >= driveTripC - 5)
        return { accepted: false, reason: "drive still within 9 °F of its trip temperature" };
      const text = c.alarmText;
      s.chillers = s.chillers.map((x, i) => (i === chillerIndex ? { ...x, alarmLatched: false, alarmText: "" } : x));
      const left = restartInhibitLeftS(c, s.tS);
      return {
        accepted: true,
        reason: `alarm "${text}" reset${left > 0 ? `; restart inhibited for ${Math.ceil(left)} s more` : ""}`,
      };
    }
    case "set-anti-recycle-timer": {
      if (chillerIndex < 0) return { accepted: false, reason: `unknown chiller ${a.equipment}` };
      const lim = timerLimits[a.timer];
      if (!Number.isFinite(a.seconds) || a.seconds < lim.min || a.seconds > lim.max)
        return {
          accepted: false,
          reason: `${a.timer} timer ${a.seconds} s is outside the controller limits ${lim.min}–${lim.max} s`,
        };
      const key = a.timer === "start-to-start" ? "startToStartS" : "stopToStartS";
      s.chillers = s.chillers.map((x, i) => (i === chillerIndex ? { ...x, [key]: a.seconds } : x));
      return { accepted: true, reason: `${a.timer} timer set to ${a.seconds} s` };
    }
    case "set-air-handler": {
      const i = Number(/^AHU-(\d+)$/.exec(a.equipment)?.[1]) - 1;
      if (!(i >= 0 && i < s.ahus.length)) return { accepted: false, reason: `unknown air handler ${a.equipment}` };
      s.ahus = s.ahus.map((x, j) => (j === i ? { ...x, override: a.run ? "on" : "off" } : x));
      return {
        accepted: true,
        reason: a.run ? "air handler started (manual on)" : "air handler stopped (manual off): its load is shed",
      };
    }
    case "set-chiller-enable": {
      if (chillerIndex < 0) return { accepted: false, reason: `unknown chiller ${a.equipment}` };
      s.chillers = s.chillers.map((x, i) => (i === chillerIndex ? { ...x, enabled: a.enabled } : x));
      return { accepted: true, reason: a.enabled ? "chiller enabled" : "chiller disabled" };
    }
    case "set-tower-bypass": {
      if (a.equipment !== towerTag) return { accepted: false, reason: `${a.equipment} has no tower bypass valve` };
      if (!s.params.towerBypass)
        return { accepted: false, reason: "this site's condenser loop has no tower bypass valve" };
      s.tower = { ...s.tower, bypassPct: a.positionPct };
      return {
        accepted: true,
        reason: `tower bypass valve at ${a.positionPct} %: that share of the condenser water skips the fill`,
      };
    }
  }
}

export function drillEvent(tS: number, a: DrillAction, o: ActionOutcome, source: string): ModelEvent {
  return {
    tS,
    kind: o.accepted ? "action" : "action-refused",
    equipment: a.equipment,
    message: `${source} ${o.accepted ? "action accepted" : "action refused"}: ${describe(a)} — ${o.reason}`,
  };
}
