// The plant overview drawing's geometry: a site's equipment records turned into boxes, pipes and text
// slots, connected as the loops run (tower → condenser-water pumps → condensers → tower; load →
// chilled-water pumps → evaporators → load). Pure: the drawing component paints the model and fills
// the slots with whatever values it is given (live or stored), so the layout never sees a reading.
// Slots name points by id and a measure, never by point key, so a customer's page carries no keys.

export type OverviewVariant = "wide" | "narrow";
export type Loop = "chilled_water" | "condenser_water";

/** One point of a piece of equipment, as the layout reads it (quantity key, server side only). */
export interface OverviewPointInput {
  id: number;
  quantity: string;
}

export interface OverviewEquipmentInput {
  tag: string;
  kind: string;
  serves: string | null;
  /** Pumps: the loop from the equipment record; absent, the tag or name decides (CWP vs CHWP, common practice). */
  loop?: Loop | null;
  name?: string;
  points: readonly OverviewPointInput[];
}

export interface Rect {
  x: number;
  y: number;
  w: number;
  h: number;
}

/** Which of the equipment's points say its state: run/off, fault, hand (command vs status), drive mode, speed. */
export interface StateRefs {
  run?: number;
  faults: number[];
  command?: number;
  mode?: number;
  speed?: number;
}

export type BoxKind = "tower" | "pump" | "chiller" | "condenser" | "evaporator" | "load";

export interface OverviewBox {
  id: string;
  kind: BoxKind;
  /** The equipment tag the box stands for ("" for the load, which stands for every air handler). */
  tag: string;
  rect: Rect;
  loop?: Loop;
}

/** A text position: `rect` is the room reserved for it (estimated at `fontPx`), checked for overlaps. */
export interface TextSlot {
  x: number;
  y: number;
  anchor: "start" | "middle" | "end";
  rect: Rect;
}

export interface ValueSlot extends TextSlot {
  id: string;
  pointId: number;
  measure: "temperature";
  /** Short word before the value ("in", "out"). */
  label: string;
  tag: string;
}

export interface StateSlot extends TextSlot {
  id: string;
  tag: string;
  kind: "chiller" | "tower_fan" | "pump";
  refs: StateRefs;
}

export interface TitleSlot extends TextSlot {
  id: string;
  text: string;
  tag: string;
}

export interface ChillerAnnotations {
  tag: string;
  /** The crossover margin bar against its minimum. */
  marginBar: Rect;
  marginText: TextSlot;
  /** "min 3.6 °F" beside the bar. */
  minText: TextSlot;
  /** Restart lockout left; time to crossover on the next row. */
  lockoutText: TextSlot;
  crossoverText: TextSlot;
  /** Where "⚑ change" goes when a temporary change is in place on the chiller. */
  changeText: TextSlot;
}

export interface OverviewPipe {
  id: string;
  loop: Loop;
  /** Supply (to the equipment that uses it) or return; the drawing marks flow direction on supply. */
  role: "supply" | "return";
  points: Array<[number, number]>;
}

export interface LoadSlot {
  rect: Rect;
  title: TextSlot;
  detail: TextSlot;
  airHandlers: Array<{ tag: string; run?: number; valve?: number }>;
}

export interface OverviewModel {
  variant: OverviewVariant;
  width: number;
  height: number;
  fontPx: number;
  boxes: OverviewBox[];
  pipes: OverviewPipe[];
  titles: TitleSlot[];
  values: ValueSlot[];
  states: StateSlot[];
  chillers: ChillerAnnotations[];
  towerChanges: Array<{ tag: string; slot: TextSlot }>;
  load: LoadSlot;
}

// Text room: 0.62 em per character covers digits, "°" and capitals in a sans-serif at this size (measured
// against the e2e test's bounding boxes, which check the real glyphs).
const CHAR_EM = 0.62;
/** Room a value takes: "100.0 °F" / "-12.3 °C" plus a stale mark. */
export const VALUE_CHARS = 9;

function slot(x: number, y: number, chars: number, fontPx: number, anchor: TextSlot["anchor"]): TextSlot {
  const w = chars * fontPx * CHAR_EM;
  const left = anchor === "start" ? x : anchor === "end" ? x - w : x - w / 2;
  // y is the baseline: the glyphs rise about 0.8 em above it and descend 0.25 em below.
  return { x, y, anchor, rect: { x: left, y: y - fontPx * 0.85, w, h: fontPx * 1.1 } };
}

function pointOf(e: OverviewEquipmentInput, quantity: string): number | undefined {
  return e.points.find((p) => p.quantity === quantity)?.id;
}

function stateRefs(e: OverviewEquipmentInput): StateRefs {
  const q = (k: string) => pointOf(e, k);
  const faults = ["drive_fault", "chiller_alarm", "fan_drive_fault", "pump_fault"].flatMap((k) => q(k) ?? []);
  if (e.kind === "cooling_tower")
    return { run: q("fan_status"), faults, mode: q("fan_drive_mode"), speed: q("fan_speed") };
  if (e.kind === "pump")
    return { run: q("pump_status"), faults, command: q("pump_run_command"), speed: q("pump_speed") };
  return { run: q("run_status"), faults };
}

/** The loop a pump is on: its record's, else its tag or name (condenser-water pumps are CWP/CDWP, common practice). */
export function pumpLoop(e: OverviewEquipmentInput): Loop {
  if (e.loop) return e.loop;
  const text = `${e.tag} ${e.name ?? ""}`.toLowerCase();
  return /\bcd?wp\b|condenser/.test(text.replace(/-/g, " ")) ? "condenser_water" : "chilled_water";
}

interface Plant {
  towers: OverviewEquipmentInput[];
  chillers: OverviewEquipmentInput[];
  /** Per chiller tag: its condenser-water and chilled-water pumps (the first of each draws). */
  cwPumps: Map<string, OverviewEquipmentInput[]>;
  chwPumps: Map<string, OverviewEquipmentInput[]>;
  airHandlers: OverviewEquipmentInput[];
}

const trailingNumber = (tag: string): string | null => /(\d+)$/.exec(tag)?.[1] ?? null;

const byTag = (a: OverviewEquipmentInput, b: OverviewEquipmentInput) =>
  a.tag.localeCompare(b.tag, "en", { numeric: true });

function plantOf(equipment: readonly OverviewEquipmentInput[]): Plant {
  const chillers = equipment.filter((e) => e.kind === "chiller").sort(byTag);
  const cwPumps = new Map<string, OverviewEquipmentInput[]>();
  const chwPumps = new Map<string, OverviewEquipmentInput[]>();
  const pumps = equipment.filter((e) => e.kind === "pump").sort(byTag);
  for (const p of pumps) {
    // A pump that names no chiller goes with the chiller of its number (CWP-2 with CH-2), else the first.
    const chiller =
      chillers.find((c) => c.tag === p.serves) ??
      chillers.find((c) => trailingNumber(c.tag) !== null && trailingNumber(c.tag) === trailingNumber(p.tag)) ??
      chillers[0];
    if (!chiller) continue;
    const into = pumpLoop(p) === "condenser_water" ? cwPumps : chwPumps;
    into.set(chiller.tag, [...(into.get(chiller.tag) ?? []), p]);
  }
  return {
    towers: equipment.filter((e) => e.kind === "cooling_tower").sort(byTag),
    chillers,
    cwPumps,
    chwPumps,
    airHandlers: equipment.filter((e) => e.kind === "air_handler").sort(byTag),
  };
}

class Builder {
  boxes: OverviewBox[] = [];
  pipes: OverviewPipe[] = [];
  titles: TitleSlot[] = [];
  values: ValueSlot[] = [];
  states: StateSlot[] = [];
  chillers: ChillerAnnotations[] = [];
  towerChanges: Array<{ tag: string; slot: TextSlot }> = [];
  constructor(readonly fontPx: number) {}
  text(x: number, y: number, chars: number, anchor: TextSlot["anchor"]): TextSlot {
    return slot(x, y, chars, this.fontPx, anchor);
  }
  title(id: string, tag: string, text: string, x: number, y: number, anchor: TextSlot["anchor"] = "start") {
    this.titles.push({ id, tag, text, ...this.text(x, y, text.length, anchor) });
  }
  value(
    e: OverviewEquipmentInput,
    quantity: string,
    label: string,
    x: number,
    y: number,
    anchor: TextSlot["anchor"],
    where: string,
  ) {
    const pointId = pointOf(e, quantity);
    // Only where measured: an unmapped sensor leaves its slot empty rather than drawing "no data".
    if (pointId === undefined) return;
    const chars = VALUE_CHARS + label.length + 1;
    this.values.push({
      id: `${e.tag}:${where}-${label}`,
      pointId,
      measure: "temperature",
      label,
      tag: e.tag,
      ...this.text(x, y, chars, anchor),
    });
  }
  state(
    e: OverviewEquipmentInput,
    kind: StateSlot["kind"],
    x: number,
    y: number,
    chars: number,
    anchor: TextSlot["anchor"],
  ) {
    this.states.push({ id: `${e.tag}:state`, tag: e.tag, kind, refs: stateRefs(e), ...this.text(x, y, chars, anchor) });
  }
  pipe(id: string, loop: Loop, role: OverviewPipe["role"], points: Array<[number, number]>) {
    this.pipes.push({ id, loop, role, points });
  }
}

/** Room a state takes: a glyph and "FAULT" / "HAND" / "RUN 100 %". */
const STATE_CHARS = 9;

interface Metrics {
  fontPx: number;
  row: number;
}

function towerBox(b: Builder, m: Metrics, t: OverviewEquipmentInput, r: Rect) {
  b.boxes.push({ id: t.tag, kind: "tower", tag: t.tag, rect: r, loop: "condenser_water" });
  const pad = 8;
  const y1 = r.y + m.row;
  b.title(`${t.tag}:title`, t.tag, t.tag, r.x + pad, y1);
  b.towerChanges.push({ tag: t.tag, slot: b.text(r.x + r.w - pad, y1, 8, "end") });
  b.state(t, "tower_fan", r.x + pad, y1 + m.row, 16, "start");
  b.value(t, "condenser_water_entering_temp", "in", r.x + pad, y1 + 2 * m.row, "start", "tower");
  b.value(t, "condenser_water_leaving_temp", "out", r.x + pad, y1 + 3 * m.row, "start", "tower");
}
const towerHeight = (m: Metrics) => 4 * m.row + 8;

function pumpBox(b: Builder, m: Metrics, p: OverviewEquipmentInput, r: Rect, loop: Loop) {
  b.boxes.push({ id: p.tag, kind: "pump", tag: p.tag, rect: r, loop });
  b.title(`${p.tag}:title`, p.tag, p.tag, r.x + r.w / 2, r.y + m.row - 2, "middle");
  b.state(p, "pump", r.x + r.w / 2, r.y + 2 * m.row - 2, 7, "middle");
}
const PUMP_W = 60;
const pumpHeight = (m: Metrics) => 2 * m.row + 4;

/** A shell: its name, then water in and out, one row each. */
const shellHeight = (m: Metrics) => 3 * m.row + 4;
/** The y of a shell's in and out rows, where its pipes attach (mid-text). */
const shellRows = (m: Metrics, shell: Rect) => ({
  inY: shell.y + 2 * m.row - 2 - m.fontPx * 0.35,
  outY: shell.y + 3 * m.row - 2 - m.fontPx * 0.35,
});

/**
 * A chiller: header row (tag, state, change flag), condenser, evaporator, then four annotation rows
 * (margin, margin bar with its minimum, restart lockout, time to crossover) across `annot`.
 */
function chillerBlock(
  b: Builder,
  m: Metrics,
  c: OverviewEquipmentInput,
  frame: { x: number; y: number; w: number },
  annot: { x: number; w: number },
) {
  const shellH = shellHeight(m);
  const y1 = frame.y + m.row;
  b.title(`${c.tag}:title`, c.tag, c.tag, frame.x, y1);
  b.state(c, "chiller", frame.x + (c.tag.length + 1) * m.fontPx * CHAR_EM, y1, STATE_CHARS, "start");
  const changeText = b.text(frame.x + frame.w, y1, 8, "end");
  const cond: Rect = { x: frame.x, y: y1 + 6, w: frame.w, h: shellH };
  const evap: Rect = { x: frame.x, y: cond.y + shellH + 6, w: frame.w, h: shellH };
  b.boxes.push({ id: `${c.tag}:condenser`, kind: "condenser", tag: c.tag, rect: cond, loop: "condenser_water" });
  b.boxes.push({ id: `${c.tag}:evaporator`, kind: "evaporator", tag: c.tag, rect: evap, loop: "chilled_water" });
  for (const [shell, rect, prefix] of [
    ["Condenser", cond, "condenser"],
    ["Evaporator", evap, "chilled"],
  ] as const) {
    b.title(`${c.tag}:${shell.toLowerCase()}:title`, c.tag, shell, rect.x + 6, rect.y + m.row - 2);
    b.value(c, `${prefix}_water_entering_temp`, "in", rect.x + 6, rect.y + 2 * m.row - 2, "start", shell.toLowerCase());
    b.value(c, `${prefix}_water_leaving_temp`, "out", rect.x + 6, rect.y + 3 * m.row - 2, "start", shell.toLowerCase());
  }
  const chars = Math.floor(annot.w / (m.fontPx * CHAR_EM));
  const yMargin = evap.y + evap.h + m.row;
  const marginText = b.text(annot.x, yMargin, chars, "start");
  const yBar = yMargin + m.row;
  const minChars = 12;
  const barW = annot.w - minChars * m.fontPx * CHAR_EM - 6;
  const marginBar: Rect = { x: annot.x, y: yBar - m.fontPx * 0.75, w: barW, h: m.fontPx * 0.7 };
  const minText = b.text(annot.x + annot.w, yBar, minChars, "end");
  const lockoutText = b.text(annot.x, yBar + m.row, chars, "start");
  const crossoverText = b.text(annot.x, yBar + 2 * m.row, chars, "start");
  b.chillers.push({ tag: c.tag, marginBar, marginText, minText, lockoutText, crossoverText, changeText });
  return { cond, evap, bottom: yBar + 2 * m.row + 6 };
}

/** Height of a chiller block: header, two shells, four annotation rows. */
const blockHeight = (m: Metrics) => m.row + 6 + 2 * shellHeight(m) + 6 + 4 * m.row + 6;

function loadBox(b: Builder, m: Metrics, plant: Plant, r: Rect): LoadSlot {
  b.boxes.push({ id: "load", kind: "load", tag: "", rect: r, loop: "chilled_water" });
  return {
    rect: r,
    title: b.text(r.x + 8, r.y + m.row, Math.floor((r.w - 16) / (m.fontPx * CHAR_EM)), "start"),
    detail: b.text(r.x + 8, r.y + 2 * m.row, Math.floor((r.w - 16) / (m.fontPx * CHAR_EM)), "start"),
    airHandlers: plant.airHandlers.map((a) => ({
      tag: a.tag,
      run: pointOf(a, "run_status"),
      valve: pointOf(a, "chilled_water_valve_position"),
    })),
  };
}
const loadHeight = (m: Metrics) => 2 * m.row + 12;

function towerRow(b: Builder, m: Metrics, plant: Plant, width: number, towerW: number, y: number): Rect[] {
  const gap = 12;
  const nt = plant.towers.length;
  const x0 = width / 2 - (nt * towerW + (nt - 1) * gap) / 2;
  return plant.towers.map((t, i) => {
    const r = { x: x0 + i * (towerW + gap), y, w: towerW, h: towerHeight(m) };
    towerBox(b, m, t, r);
    return r;
  });
}

/** Desktop: chillers side by side between the tower row and the load; headers run across. */
function wideLayout(plant: Plant): OverviewModel {
  const m: Metrics = { fontPx: 12, row: 17 };
  const b = new Builder(m.fontPx);
  const n = Math.max(1, plant.chillers.length);
  const frameW = 220;
  const colW = frameW + 2 * 44 + 16;
  const width = Math.max(640, n * colW + 24);
  const towers = towerRow(b, m, plant, width, 240, 8);
  const towerBottom = 8 + towerHeight(m);
  const cwReturnY = towerBottom + 20;
  const cwSupplyY = cwReturnY + 14;
  const pumpH = pumpHeight(m);
  const frameY = cwSupplyY + 12 + pumpH + 8;
  const frameBottom = frameY + blockHeight(m);
  const chwSupplyY = frameBottom + 8 + pumpH + 12;
  const chwReturnY = chwSupplyY + 14;
  const loadY = chwReturnY + 24;
  const x0 = (width - n * colW) / 2;
  let leftmost = width;
  let rightmost = 0;
  plant.chillers.forEach((c, i) => {
    const cx = x0 + colW * (i + 0.5);
    const frame = { x: cx - frameW / 2, y: frameY, w: frameW };
    const { cond, evap } = chillerBlock(b, m, c, frame, frame);
    const leftX = frame.x - 14;
    const rightX = frame.x + frame.w + 14;
    leftmost = Math.min(leftmost, leftX);
    rightmost = Math.max(rightmost, rightX);
    const cr = shellRows(m, cond);
    const er = shellRows(m, evap);
    // Condenser water: supply header → pump → condenser; condenser → return header.
    b.pipe(`${c.tag}:cw-supply`, "condenser_water", "supply", [
      [leftX, cwSupplyY],
      [leftX, cr.inY],
      [cond.x, cr.inY],
    ]);
    b.pipe(`${c.tag}:cw-return`, "condenser_water", "return", [
      [cond.x + cond.w, cr.outY],
      [rightX, cr.outY],
      [rightX, cwReturnY],
    ]);
    // Chilled water: return header → pump → evaporator; evaporator → supply header.
    b.pipe(`${c.tag}:chw-return`, "chilled_water", "return", [
      [rightX, chwReturnY],
      [rightX, er.inY],
      [evap.x + evap.w, er.inY],
    ]);
    b.pipe(`${c.tag}:chw-supply`, "chilled_water", "supply", [
      [evap.x, er.outY],
      [leftX, er.outY],
      [leftX, chwSupplyY],
    ]);
    const cwp = plant.cwPumps.get(c.tag)?.[0];
    if (cwp) pumpBox(b, m, cwp, { x: leftX - PUMP_W / 2, y: cwSupplyY + 12, w: PUMP_W, h: pumpH }, "condenser_water");
    const chwp = plant.chwPumps.get(c.tag)?.[0];
    if (chwp) pumpBox(b, m, chwp, { x: rightX - PUMP_W / 2, y: frameBottom + 8, w: PUMP_W, h: pumpH }, "chilled_water");
  });
  towers.forEach((r, i) => {
    const hot = r.x + 30;
    const cold = r.x + r.w - 30;
    b.pipe(`tower${i}:in`, "condenser_water", "return", [
      [hot, cwReturnY],
      [hot, r.y + r.h],
    ]);
    b.pipe(`tower${i}:out`, "condenser_water", "supply", [
      [cold, r.y + r.h],
      [cold, cwSupplyY],
    ]);
    leftmost = Math.min(leftmost, hot);
    rightmost = Math.max(rightmost, cold);
  });
  const load = { x: width / 2 - 160, y: loadY, w: 320, h: loadHeight(m) };
  b.pipe("load:in", "chilled_water", "supply", [
    [load.x + 30, chwSupplyY],
    [load.x + 30, load.y],
  ]);
  b.pipe("load:out", "chilled_water", "return", [
    [load.x + load.w - 30, load.y],
    [load.x + load.w - 30, chwReturnY],
  ]);
  const l = Math.min(leftmost, load.x + 30);
  const r = Math.max(rightmost, load.x + load.w - 30);
  const header = (id: string, loop: Loop, role: OverviewPipe["role"], y: number) =>
    b.pipe(id, loop, role, [
      [l, y],
      [r, y],
    ]);
  header("cw-return-header", "condenser_water", "return", cwReturnY);
  header("cw-supply-header", "condenser_water", "supply", cwSupplyY);
  header("chw-supply-header", "chilled_water", "supply", chwSupplyY);
  header("chw-return-header", "chilled_water", "return", chwReturnY);
  const loadSlot = loadBox(b, m, plant, load);
  return finish(b, "wide", width, loadY + load.h + 8, loadSlot);
}

/** Phone: chillers stacked between the tower row and the load; headers run down both sides. */
function narrowLayout(plant: Plant): OverviewModel {
  const m: Metrics = { fontPx: 12, row: 16 };
  const b = new Builder(m.fontPx);
  const width = 360;
  const cwSupplyX = 5;
  const cwReturnX = 15;
  const chwSupplyX = width - 15;
  const chwReturnX = width - 5;
  const frame = { x: 90, w: 180 };
  const annot = { x: 24, w: width - 48 };
  const towerW = plant.towers.length > 1 ? 150 : 200;
  const towers = towerRow(b, m, plant, width, towerW, 6);
  const hotY = 6 + towerHeight(m) + 12;
  const coldY = hotY + 12;
  const pumpH = pumpHeight(m);
  let y = coldY + 14;
  let lastCondIn = coldY;
  let lastCondOut = coldY;
  let firstEvapIn: number | null = null;
  let firstEvapOut: number | null = null;
  for (const c of plant.chillers) {
    const { cond, evap, bottom } = chillerBlock(b, m, c, { ...frame, y }, annot);
    const cr = shellRows(m, cond);
    const er = shellRows(m, evap);
    b.pipe(`${c.tag}:cw-supply`, "condenser_water", "supply", [
      [cwSupplyX, cr.inY],
      [cond.x, cr.inY],
    ]);
    b.pipe(`${c.tag}:cw-return`, "condenser_water", "return", [
      [cond.x, cr.outY],
      [cwReturnX, cr.outY],
    ]);
    b.pipe(`${c.tag}:chw-return`, "chilled_water", "return", [
      [chwReturnX, er.inY],
      [evap.x + evap.w, er.inY],
    ]);
    b.pipe(`${c.tag}:chw-supply`, "chilled_water", "supply", [
      [evap.x + evap.w, er.outY],
      [chwSupplyX, er.outY],
    ]);
    // Pumps sit on the in-branch, above the out-branch.
    const cwp = plant.cwPumps.get(c.tag)?.[0];
    if (cwp)
      pumpBox(
        b,
        m,
        cwp,
        { x: (cwReturnX + cond.x) / 2 - PUMP_W / 2 + 3, y: cr.inY - pumpH + 8, w: PUMP_W, h: pumpH },
        "condenser_water",
      );
    const chwp = plant.chwPumps.get(c.tag)?.[0];
    if (chwp)
      pumpBox(
        b,
        m,
        chwp,
        { x: (evap.x + evap.w + chwSupplyX) / 2 - PUMP_W / 2 - 3, y: er.inY - pumpH + 8, w: PUMP_W, h: pumpH },
        "chilled_water",
      );
    lastCondIn = cr.inY;
    lastCondOut = cr.outY;
    firstEvapIn ??= er.inY;
    firstEvapOut ??= er.outY;
    y = bottom + 12;
  }
  towers.forEach((r, i) => {
    const hot = r.x + 24;
    const cold = r.x + r.w - 24;
    b.pipe(`tower${i}:in`, "condenser_water", "return", [
      [hot, hotY],
      [hot, r.y + r.h],
    ]);
    b.pipe(`tower${i}:out`, "condenser_water", "supply", [
      [cold, r.y + r.h],
      [cold, coldY],
    ]);
  });
  const far = towers.at(-1) ?? { x: 40, w: 48, y: 0, h: 0 };
  b.pipe("cw-return-header", "condenser_water", "return", [
    [cwReturnX, lastCondOut],
    [cwReturnX, hotY],
    [far.x + 24, hotY],
  ]);
  b.pipe("cw-supply-header", "condenser_water", "supply", [
    [far.x + far.w - 24, coldY],
    [cwSupplyX, coldY],
    [cwSupplyX, lastCondIn],
  ]);
  const load = { x: 40, y, w: width - 80, h: loadHeight(m) };
  b.pipe("chw-supply-header", "chilled_water", "supply", [
    [chwSupplyX, firstEvapOut ?? y],
    [chwSupplyX, load.y + 12],
    [load.x + load.w, load.y + 12],
  ]);
  b.pipe("chw-return-header", "chilled_water", "return", [
    [load.x + load.w, load.y + load.h - 10],
    [chwReturnX, load.y + load.h - 10],
    [chwReturnX, firstEvapIn ?? y],
  ]);
  const loadSlot = loadBox(b, m, plant, load);
  return finish(b, "narrow", width, load.y + load.h + 6, loadSlot);
}

function finish(b: Builder, variant: OverviewVariant, width: number, height: number, load: LoadSlot): OverviewModel {
  return {
    variant,
    width,
    height,
    fontPx: b.fontPx,
    boxes: b.boxes,
    pipes: b.pipes,
    titles: b.titles,
    values: b.values,
    states: b.states,
    chillers: b.chillers,
    towerChanges: b.towerChanges,
    load,
  };
}

/** The drawing model of a site's plant for a phone (`narrow`, stacked) or a wider screen. */
export function overviewLayout(equipment: readonly OverviewEquipmentInput[], variant: OverviewVariant): OverviewModel {
  const plant = plantOf(equipment);
  return variant === "wide" ? wideLayout(plant) : narrowLayout(plant);
}

/** Every text slot of a model, for overlap checks. */
export function textRects(model: OverviewModel): Array<{ id: string; rect: Rect }> {
  return [
    ...model.titles.map((t) => ({ id: t.id, rect: t.rect })),
    ...model.values.map((v) => ({ id: v.id, rect: v.rect })),
    ...model.states.map((s) => ({ id: s.id, rect: s.rect })),
    ...model.chillers.flatMap((c) => [
      { id: `${c.tag}:margin-bar`, rect: c.marginBar },
      { id: `${c.tag}:margin`, rect: c.marginText.rect },
      { id: `${c.tag}:min`, rect: c.minText.rect },
      { id: `${c.tag}:lockout`, rect: c.lockoutText.rect },
      { id: `${c.tag}:crossover`, rect: c.crossoverText.rect },
      { id: `${c.tag}:change`, rect: c.changeText.rect },
    ]),
    ...model.towerChanges.map((t) => ({ id: `${t.tag}:change`, rect: t.slot.rect })),
    { id: "load:title", rect: model.load.title.rect },
    { id: "load:detail", rect: model.load.detail.rect },
  ];
}

export function rectsOverlap(a: Rect, b: Rect): boolean {
  return a.x < b.x + b.w && b.x < a.x + a.w && a.y < b.y + b.h && b.y < a.y + a.h;
}
