// The plant overview's drawing model: every supported layout (one to four chillers, one or two
// towers, each simulator layout) draws without overlapping boxes or labels, inside its own width,
// with every shell and pump on a pipe of its own loop. The loop topology checked is the usual
// primary-only plant: tower → condenser-water pump → condenser → tower; load → chilled-water pump
// → evaporator → load (ASHRAE Handbook—HVAC Systems and Equipment, ch. 13 and 40, recalled).
import { describe, expect, it } from "vitest";
import { isQuantityKey, pointsByKind, type EquipmentKind } from "@/lib/quantities";
import {
  overviewLayout,
  rectsOverlap,
  textRects,
  type OverviewEquipmentInput,
  type OverviewModel,
  type OverviewVariant,
  type Rect,
} from "@/lib/plant/overview-layout";
import { equipmentOf, siteLayouts, threeChillerLayout } from "@/simulator/layout";
import { pointsOf } from "@/simulator/points";

let nextId = 1;
function withPoints(
  tag: string,
  kind: EquipmentKind,
  extra: Partial<OverviewEquipmentInput> = {},
): OverviewEquipmentInput {
  return {
    tag,
    kind,
    serves: null,
    ...extra,
    points: pointsByKind[kind].map((quantity) => ({ id: nextId++, quantity })),
  };
}

/** A plant as the equipment form records it: dedicated pumps naming their chiller and loop. */
function plant(chillers: number, towers: number, airHandlers = 4): OverviewEquipmentInput[] {
  const out: OverviewEquipmentInput[] = [];
  for (let i = 1; i <= chillers; i++) {
    out.push(withPoints(`CH-${i}`, "chiller"));
    out.push(withPoints(`CHWP-${i}`, "pump", { serves: `CH-${i}`, loop: "chilled_water" }));
    out.push(withPoints(`CWP-${i}`, "pump", { serves: `CH-${i}`, loop: "condenser_water" }));
  }
  for (let i = 1; i <= towers; i++) out.push(withPoints(`CT-${i}`, "cooling_tower"));
  for (let i = 1; i <= airHandlers; i++) out.push(withPoints(`AHU-${i}`, "air_handler", { serves: "chw-loop" }));
  out.push(withPoints("WS-1", "weather_station"));
  return out;
}

/** A simulator layout's equipment as its gateway maps it (pumps named by tag, no record). */
function simulated(name: string, layout = siteLayouts[name]): OverviewEquipmentInput[] {
  return equipmentOf(layout).map((e) => ({
    tag: e.tag,
    kind: e.kind,
    name: e.name,
    serves: null,
    points: pointsOf(layout, e.kind)
      .filter(isQuantityKey)
      .map((quantity) => ({ id: nextId++, quantity })),
  }));
}

const inside = (inner: Rect, outer: Rect) =>
  inner.x >= outer.x - 0.01 &&
  inner.y >= outer.y - 0.01 &&
  inner.x + inner.w <= outer.x + outer.w + 0.01 &&
  inner.y + inner.h <= outer.y + outer.h + 0.01;

/** A segment as a thin rectangle, its ends pulled in so that touching a box edge is not crossing it. */
function segmentRect([x1, y1]: [number, number], [x2, y2]: [number, number]): Rect {
  const shrink = 1.5;
  if (x1 === x2) {
    const [a, b] = [Math.min(y1, y2) + shrink, Math.max(y1, y2) - shrink];
    return { x: x1 - 0.5, y: a, w: 1, h: Math.max(0, b - a) };
  }
  const [a, b] = [Math.min(x1, x2) + shrink, Math.max(x1, x2) - shrink];
  return { x: a, y: y1 - 0.5, w: Math.max(0, b - a), h: 1 };
}

function checkModel(model: OverviewModel, chillers: number, towers: number) {
  const problems: string[] = [];
  const boxes = model.boxes;
  for (let i = 0; i < boxes.length; i++) {
    const a = boxes[i];
    if (!inside(a.rect, { x: 0, y: 0, w: model.width, h: model.height })) problems.push(`${a.id} outside the drawing`);
    for (let j = i + 1; j < boxes.length; j++)
      if (rectsOverlap(a.rect, boxes[j].rect)) problems.push(`boxes ${a.id} and ${boxes[j].id} overlap`);
  }
  const texts = textRects(model);
  for (let i = 0; i < texts.length; i++) {
    const a = texts[i];
    if (!inside(a.rect, { x: 0, y: 0, w: model.width, h: model.height })) problems.push(`${a.id} outside the drawing`);
    for (let j = i + 1; j < texts.length; j++)
      if (rectsOverlap(a.rect, texts[j].rect)) problems.push(`texts ${a.id} and ${texts[j].id} overlap`);
    // A label sits wholly inside one box or clear of every box.
    const touching = boxes.filter((b) => rectsOverlap(a.rect, b.rect));
    if (touching.length > 1 || (touching.length === 1 && !inside(a.rect, touching[0].rect)))
      problems.push(`${a.id} straddles ${touching.map((b) => b.id).join(", ")}`);
  }
  // Pipes cross no box but the pumps they carry (drawn over them), and no label outside a pump.
  const pumpRects = boxes.filter((b) => b.kind === "pump").map((b) => b.rect);
  for (const p of model.pipes)
    for (let k = 1; k < p.points.length; k++) {
      const seg = segmentRect(p.points[k - 1], p.points[k]);
      for (const b of boxes)
        if (b.kind !== "pump" && rectsOverlap(seg, b.rect)) problems.push(`pipe ${p.id} crosses ${b.id}`);
      for (const t of texts)
        if (rectsOverlap(seg, t.rect) && !pumpRects.some((r) => inside(t.rect, r)))
          problems.push(`pipe ${p.id} crosses label ${t.id}`);
    }
  // Every shell has a pipe of its loop ending on its edge; every pump sits on a pipe of its loop.
  const onEdge = ([x, y]: [number, number], r: Rect) =>
    (Math.abs(x - r.x) < 0.01 || Math.abs(x - r.x - r.w) < 0.01) && y > r.y && y < r.y + r.h;
  for (const b of boxes) {
    const loopPipes = model.pipes.filter((p) => p.loop === b.loop);
    if (b.kind === "condenser" || b.kind === "evaporator") {
      const ends = loopPipes.flatMap((p) => [p.points[0], p.points.at(-1)!]).filter((pt) => onEdge(pt, b.rect));
      if (ends.length !== 2) problems.push(`${b.id} has ${ends.length} pipe ends, expected in and out`);
    }
    if (b.kind === "pump") {
      const carried = loopPipes.some((p) =>
        p.points.slice(1).some((pt, k) => rectsOverlap(segmentRect(p.points[k], pt), b.rect)),
      );
      if (!carried) problems.push(`${b.id} is on no ${b.loop} pipe`);
    }
  }
  expect(problems).toEqual([]);
  expect(boxes.filter((b) => b.kind === "condenser")).toHaveLength(chillers);
  expect(boxes.filter((b) => b.kind === "evaporator")).toHaveLength(chillers);
  expect(boxes.filter((b) => b.kind === "tower")).toHaveLength(towers);
  expect(boxes.filter((b) => b.kind === "pump")).toHaveLength(2 * chillers);
  expect(boxes.filter((b) => b.kind === "load")).toHaveLength(1);
  expect(model.chillers).toHaveLength(chillers);
}

const variants: OverviewVariant[] = ["narrow", "wide"];

describe("plant overview layout", () => {
  for (const variant of variants)
    for (const chillers of [1, 2, 3, 4])
      for (const towers of [1, 2])
        it(`${variant}: ${chillers} chiller(s), ${towers} tower(s) — no overlaps, every shell and pump on its loop`, () => {
          checkModel(overviewLayout(plant(chillers, towers), variant), chillers, towers);
        });

  const layouts = { ...siteLayouts, "three-chiller": threeChillerLayout() };
  for (const [name, layout] of Object.entries(layouts))
    for (const variant of variants)
      it(`${variant}: simulator layout ${name}`, () => {
        const model = overviewLayout(simulated(name, layout), variant);
        checkModel(model, layout.chillers.length, 1);
        // Pumps named CWP-n / CHWP-n without a record go on chiller n's condenser / chilled-water branch.
        for (let i = 1; i <= layout.chillers.length; i++) {
          expect(model.boxes.find((b) => b.tag === `CWP-${i}`)?.loop).toBe("condenser_water");
          expect(model.boxes.find((b) => b.tag === `CHWP-${i}`)?.loop).toBe("chilled_water");
        }
      });

  it("the phone variant is 360 wide (a 390-px screen less its margins) and stacks chillers", () => {
    const m = overviewLayout(plant(3, 2), "narrow");
    expect(m.width).toBe(360);
    const tops = m.boxes.filter((b) => b.kind === "condenser").map((b) => b.rect.y);
    expect(new Set(tops).size).toBe(3);
    const wide = overviewLayout(plant(3, 2), "wide");
    expect(new Set(wide.boxes.filter((b) => b.kind === "condenser").map((b) => b.rect.y)).size).toBe(1);
  });

  it("draws a value only where its sensor is mapped, and names points by id, never by key", () => {
    const eq = plant(1, 1).map((e) =>
      e.tag === "CH-1" ? { ...e, points: e.points.filter((p) => p.quantity !== "condenser_water_leaving_temp") } : e,
    );
    const m = overviewLayout(eq, "narrow");
    const tagsAndLabels = m.values.filter((v) => v.tag === "CH-1").map((v) => v.label);
    expect(tagsAndLabels).toEqual(["in", "in", "out"]);
    expect(JSON.stringify(m)).not.toMatch(/chilled_water_leaving_temp"|Temperature_Sensor/);
  });
});
