import type { Db } from "@/db/client";
import {
  endQuietIncidents,
  fileActivation,
  getIncident,
  hasLastingIncident,
  incidentReadings,
  reviewSources,
  siteEquipmentKinds,
} from "@/db/queries/incidents";
import { siteEquipment } from "@/db/queries/sites";
import type { StoredTransition } from "@/db/queries/alarms";
import { seesAllSites, type Viewer } from "@/lib/auth/viewer";
import type { IncidentDto, IncidentReviewDto, TrendPanelDto } from "@/lib/dto/incidents";
import { notFound } from "@/lib/errors";
import { ruleInWords } from "@/lib/incidents/grouping";
import { keyFigures, pairSeries, type TimedSeries } from "@/lib/incidents/key-figures";
import {
  orderTimeline,
  plantEventQuantities,
  plantEvents,
  trendQuantitiesFor,
  wallToEventTime,
  type PlantEventQuantity,
  type TimelineEntry,
} from "@/lib/incidents/timeline";
import { minStartMarginK } from "@/lib/plant/crossover";
import { asRefrigerant, limitsOf } from "@/lib/plant/equipment-limits";
import { quantities, type QuantityKey } from "@/lib/quantities";
import { saturationTempC } from "@/lib/refrigerant";
import { deltaFromCanonical, displayUnit, fromCanonical, type UnitSystem } from "@/lib/units";

// Incidents at run time: the alarm service hands every stored activation here to be filed into an
// incident, and asks after each evaluation whether a quiet incident has ended. The review page and
// its PDF are assembled here from the stored history (db/queries/incidents.ts) and pure lib/incidents.

export interface IncidentFiler {
  /** After alarm changes were saved: files each new activation. */
  saved(siteId: string, stored: readonly StoredTransition[]): void;
  /** After an evaluation at event time `atMs`: ends incidents that have been quiet long enough. */
  evaluated(siteId: string, atMs: number): void;
  /** A simulated run replaced the site's timeline. */
  forget(siteId: string): void;
}

export function createIncidentFiler(db: Db, log?: (line: string) => void): IncidentFiler {
  // Which sites have a lasting incident, so the end check reads the database only when one may end.
  const lasting = new Map<string, boolean>();
  return {
    saved(siteId, stored) {
      for (const s of stored) {
        if (s.record.cause !== "condition_active") continue;
        try {
          const row = db.$client
            .prepare("select active_since_ms as activeSinceMs from alarms where id = ?")
            .get(s.alarmId) as { activeSinceMs: number | null } | undefined;
          fileActivation(db, siteId, { alarmId: s.alarmId, activeSinceMs: row?.activeSinceMs ?? s.record.atMs });
          lasting.set(siteId, true);
        } catch (err) {
          // Grouping must never stop the alarms themselves; a missed activation can be merged by hand.
          log?.(`[incidents] ${siteId}: could not file ${s.record.alarmKey}: ${String(err)}`);
        }
      }
    },
    evaluated(siteId, atMs) {
      let known = lasting.get(siteId);
      if (known === undefined) {
        known = hasLastingIncident(db, siteId);
        lasting.set(siteId, known);
      }
      if (!known) return;
      try {
        endQuietIncidents(db, siteId, atMs);
        lasting.set(siteId, hasLastingIncident(db, siteId));
      } catch (err) {
        log?.(`[incidents] ${siteId}: end check failed: ${String(err)}`);
      }
    },
    forget(siteId) {
      lasting.delete(siteId);
    },
  };
}

// ---------------------------------------------------------------- the review

const MARGIN_PAD_MS = 10 * 60_000;
const MAX_POINTS = 600;

function alarmText(t: { from: string; to: string; cause: string; ruleId: string }): string {
  const rule = ruleInWords(t.ruleId);
  switch (t.cause) {
    case "condition_active":
      return `${rule}: alarm raised`;
    case "condition_cleared":
      return `${rule}: returned to normal (${t.to.replaceAll("_", " ")})`;
    case "acknowledged":
      return `${rule}: acknowledged`;
    case "shelved":
      return `${rule}: shelved`;
    case "unshelved":
    case "shelf_expired":
      return `${rule}: ${t.cause.replaceAll("_", " ")}`;
    default:
      return `${rule}: ${t.cause.replaceAll("_", " ")} (${t.from.replaceAll("_", " ")} → ${t.to.replaceAll("_", " ")})`;
  }
}

function convert(v: number, q: QuantityKey, system: UnitSystem): number {
  const measure = quantities[q].measure;
  return measure === "boolean" || measure === "state" ? v : Math.round(fromCanonical(v, measure, system) * 100) / 100;
}

/** The whole review of an incident: staff get everything; a customer only the shared incident itself. */
export function buildIncidentReview(db: Db, viewer: Viewer, incidentId: string): IncidentReviewDto {
  const incident = getIncident(db, viewer, incidentId);
  if (!incident) throw notFound("No such incident.");
  const system = viewer.unitSystem;
  if (!seesAllSites(viewer))
    return {
      incident,
      fromMs: incident.startedAtMs,
      toMs: incident.endedAtMs ?? incident.startedAtMs,
      timeline: [],
      panels: [],
      keyFigures: keyFigures({ members: [], acknowledgedAtMs: [], actionAtMs: [] }),
      unitSystem: system,
    };
  return staffReview(db, incident, system);
}

function staffReview(db: Db, incident: IncidentDto, system: UnitSystem): IncidentReviewDto {
  const fromMs = incident.startedAtMs - MARGIN_PAD_MS;
  const lastMemberMs = Math.max(incident.startedAtMs, ...incident.members.map((m) => m.clearedAtMs ?? m.activeSinceMs));
  // A lasting incident runs to the site's newest reading; an ended one a little past its end.
  let toMs = (incident.endedAtMs ?? lastMemberMs) + MARGIN_PAD_MS;
  const sources = reviewSources(db, incident, fromMs, Number.MAX_SAFE_INTEGER);
  if (incident.endedAtMs === null && sources.latestReadingMs) toMs = Math.max(toMs, sources.latestReadingMs);
  const transitions =
    incident.endedAtMs === null
      ? sources.alarmTransitions
      : sources.alarmTransitions.filter((t) => t.eventAtMs <= toMs);
  const pairs = transitions.map((t) => ({ wallMs: t.wallAtMs, eventMs: t.eventAtMs }));
  const toEvent = (wallMs: number) => wallToEventTime(pairs, wallMs);

  const entries: TimelineEntry[] = [];
  for (const t of transitions) {
    const kind =
      t.cause === "acknowledged"
        ? "acknowledgement"
        : t.cause === "shelved" || t.cause === "unshelved"
          ? "shelving"
          : "alarm";
    entries.push({
      atMs: t.eventAtMs,
      kind,
      equipment: t.equipment,
      text: alarmText(t) + (t.note ? ` — “${t.note}”` : ""),
      who: t.actor,
      ruleId: t.ruleId,
      priority: t.priority,
    });
  }
  for (const n of sources.notes)
    entries.push({ atMs: toEvent(n.wallMs), kind: "note", equipment: n.equipment, text: n.text, who: n.who });
  for (const v of sources.visitEntries)
    entries.push({ atMs: toEvent(v.wallMs), kind: "visit", equipment: null, text: v.text, who: v.who });
  for (const c of sources.changes) {
    entries.push({
      atMs: toEvent(c.madeWallMs),
      kind: "change_made",
      equipment: c.equipment,
      text: `Temporary change: ${c.what} ${c.fromValue} → ${c.toValue}`,
      who: c.madeBy,
    });
    if (c.putBackWallMs !== null)
      entries.push({
        atMs: toEvent(c.putBackWallMs),
        kind: "change_put_back",
        equipment: c.equipment,
        text: `Put back: ${c.what} to ${c.fromValue}`,
        who: c.putBackBy,
      });
  }

  // What to read: the chillers the alarms name (else all), and the towers and pumps.
  const kinds = siteEquipmentKinds(db, incident.siteId);
  const named = new Set(incident.members.map((m) => m.equipment));
  const allChillers = kinds.filter((k) => k.kind === "chiller").map((k) => k.tag);
  const chillers = allChillers.filter((t) => named.has(t)).length
    ? allChillers.filter((t) => named.has(t))
    : allChillers;
  const towers = kinds.filter((k) => k.kind === "cooling_tower").map((k) => k.tag);
  const pumps = kinds.filter((k) => k.kind === "pump").map((k) => k.tag);
  const want = trendQuantitiesFor(incident.members.map((m) => m.ruleId));
  const wanted: Array<{ equipment: string; quantity: string }> = [
    ...chillers.flatMap((tag) => want.chiller.map((quantity) => ({ equipment: tag, quantity }))),
    ...towers.flatMap((tag) => want.tower.map((quantity) => ({ equipment: tag, quantity }))),
    ...[...chillers, ...towers, ...pumps].flatMap((tag) =>
      plantEventQuantities.map((quantity) => ({ equipment: tag, quantity })),
    ),
  ];
  const span = Math.max(1, toMs - fromMs);
  const bucketMs = Math.max(10_000, Math.ceil(span / MAX_POINTS / 1000) * 1000);
  const data = incidentReadings(db, incident.siteId, wanted, fromMs, toMs, bucketMs);
  const series = (tag: string, q: QuantityKey): TimedSeries | null => {
    const s = data.numbers.find((n) => n.equipment === tag && n.quantity === q);
    return s ? { tsMs: s.tsMs, values: s.values } : null;
  };
  const changesOf = (tag: string, q: QuantityKey) =>
    data.changes.find((c) => c.equipment === tag && c.quantity === q)?.points ?? [];

  entries.push(
    ...plantEvents(
      data.changes
        .filter((c) => (plantEventQuantities as readonly string[]).includes(c.quantity))
        .map((c) => ({ equipment: c.equipment, quantity: c.quantity as PlantEventQuantity, points: c.points })),
      fromMs,
      toMs,
    ),
  );
  // A lasting incident runs on to what people did most recently (commands land on the site's clock past the last reading).
  if (incident.endedAtMs === null) toMs = Math.max(toMs, ...entries.map((e) => e.atMs));
  const timeline = orderTimeline(entries.filter((e) => e.atMs >= fromMs && e.atMs <= toMs));

  // Margin: condenser water entering minus chilled water entering, the reading the crossing is judged on.
  const margins = chillers.map((tag) => {
    const cw = series(tag, "condenser_water_entering_temp");
    const chw = series(tag, "chilled_water_entering_temp");
    return { tag, margin: cw && chw ? pairSeries(cw, chw, (a, b) => a - b) : null };
  });
  const site = siteEquipment(db, incident.siteId);
  const panels: TrendPanelDto[] = [];
  const tempUnit = displayUnit("temperature", system);
  const num = (tag: string, q: QuantityKey, label: string) => {
    const s = series(tag, q);
    return s
      ? [{ label, equipment: tag, quantity: q, tsMs: [...s.tsMs], values: s.values.map((v) => convert(v, q, system)) }]
      : [];
  };
  const multi = chillers.length > 1;
  const tagged = (tag: string, label: string) => (multi ? `${tag} ${label}` : label);
  panels.push({
    id: "water",
    title: "Condenser and chilled water",
    unit: tempUnit,
    thresholds: [],
    series: chillers.flatMap((tag) => [
      ...num(tag, "condenser_water_entering_temp", tagged(tag, "condenser water entering")),
      ...num(tag, "condenser_water_leaving_temp", tagged(tag, "condenser water leaving")),
      ...num(tag, "chilled_water_entering_temp", tagged(tag, "chilled water entering")),
      ...num(tag, "chilled_water_leaving_temp", tagged(tag, "chilled water leaving")),
    ]),
  });
  const firstChiller = site.find((e) => e.tag === chillers[0]);
  let startMarginK: number | null = null;
  if (firstChiller) {
    const evap = series(firstChiller.tag, "evaporator_refrigerant_pressure");
    const refrigerant = asRefrigerant(firstChiller.refrigerant) ?? "R-134a";
    if (evap?.values.length) {
      // At the evaporator pressure the margin was lowest near; the same target the crossover warning projects to.
      const sorted = [...evap.values].sort((a, b) => a - b);
      const median = sorted[Math.floor(sorted.length / 2)];
      startMarginK = minStartMarginK(
        (p) => saturationTempC(refrigerant, p),
        median,
        limitsOf(firstChiller).minStartLiftKPa,
      );
    }
  }
  const deltaUnit = system === "ip" ? "°F" : "K";
  const delta = (k: number) => Math.round(deltaFromCanonical(k, system) * 100) / 100;
  panels.push({
    id: "margin",
    title: "Crossover margin (condenser water entering − chilled water entering)",
    unit: `Δ${deltaUnit}`,
    thresholds: [
      ...(startMarginK !== null
        ? [{ label: "minimum start margin (warning target)", value: delta(startMarginK) }]
        : []),
      { label: "crossed", value: 0 },
    ],
    series: margins
      .filter((m) => m.margin)
      .map((m) => ({
        label: tagged(m.tag, "margin"),
        equipment: m.tag,
        quantity: "crossover_margin",
        tsMs: [...m.margin!.tsMs],
        values: m.margin!.values.map(delta),
      })),
  });
  panels.push({
    id: "pressures",
    title: "Refrigerant pressures",
    unit: displayUnit("pressure", system),
    thresholds: firstChiller
      ? [
          {
            label: "high-pressure cut-out",
            value: convert(limitsOf(firstChiller).highCondPressureCutoutKPa, "condenser_refrigerant_pressure", system),
          },
        ]
      : [],
    series: chillers.flatMap((tag) => [
      ...num(tag, "condenser_refrigerant_pressure", tagged(tag, "condenser")),
      ...num(tag, "evaporator_refrigerant_pressure", tagged(tag, "evaporator")),
    ]),
  });
  panels.push({
    id: "lift",
    title: "Lift (condenser − evaporator pressure)",
    unit: displayUnit("differential_pressure", system),
    thresholds: firstChiller
      ? [
          {
            label: "minimum start lift",
            value:
              Math.round(fromCanonical(limitsOf(firstChiller).minStartLiftKPa, "differential_pressure", system) * 100) /
              100,
          },
        ]
      : [],
    series: chillers.flatMap((tag) => {
      const c = series(tag, "condenser_refrigerant_pressure");
      const e = series(tag, "evaporator_refrigerant_pressure");
      if (!c || !e) return [];
      const lift = pairSeries(c, e, (a, b) => a - b);
      return [
        {
          label: tagged(tag, "lift"),
          equipment: tag,
          quantity: "lift",
          tsMs: [...lift.tsMs],
          values: lift.values.map((v) => Math.round(fromCanonical(v, "differential_pressure", system) * 100) / 100),
        },
      ];
    }),
  });
  panels.push({
    id: "drive",
    title: "Drive temperature",
    unit: tempUnit,
    thresholds: firstChiller
      ? [
          {
            label: "drive temperature trip",
            value: convert(limitsOf(firstChiller).driveTempTripC, "drive_temp", system),
          },
        ]
      : [],
    series: chillers.flatMap((tag) => num(tag, "drive_temp", tagged(tag, "drive temperature"))),
  });
  // States as steps from their changes: run status 0/1, fan drive mode by its index.
  const steps = (tag: string, q: QuantityKey, label: string, map: (v: number | string | null) => number) => {
    const pts = changesOf(tag, q);
    if (!pts.length) return [];
    const tsMs = [...pts.map((p) => Math.max(p.tsMs, fromMs)), toMs];
    const values = [...pts.map((p) => map(p.value)), map(pts[pts.length - 1].value)];
    return [{ label, equipment: tag, quantity: q, tsMs, values }];
  };
  const truthy = (v: number | string | null) => (v === "true" || v === 1 ? 1 : 0);
  panels.push({
    id: "states",
    title: "Compressor run status and fan drive",
    unit: "state",
    thresholds: [],
    stateNames: ["off / stopped", "hand / running", "auto"],
    series: [
      ...chillers.flatMap((tag) => steps(tag, "run_status", tagged(tag, "compressor running (1)"), truthy)),
      ...towers.flatMap((tag) =>
        steps(tag, "fan_drive_mode", `${tag} fan drive mode (0 off, 1 hand, 2 auto)`, (v) =>
          Math.max(0, ["off", "hand", "auto"].indexOf(String(v))),
        ),
      ),
      ...towers.flatMap((tag) => steps(tag, "fan_status", `${tag} fan proven (1)`, truthy)),
    ],
  });

  const allMargin = margins.find((m) => m.margin)?.margin ?? null;
  const drive = chillers.map((t) => series(t, "drive_temp")).find((s) => s) ?? null;
  const people = (k: TimelineEntry["kind"]) => timeline.filter((e) => e.kind === k).map((e) => e.atMs);
  const figures = keyFigures({
    members: incident.members,
    acknowledgedAtMs: people("acknowledgement"),
    actionAtMs: [...people("note"), ...people("visit"), ...people("change_made"), ...people("shelving")],
    marginK: allMargin,
    driveTempC: drive,
  });
  return {
    incident,
    fromMs,
    toMs,
    timeline,
    panels: panels.filter((p) => p.series.length),
    keyFigures: figures,
    unitSystem: system,
  };
}
