// The overview component rendered to markup (react-dom/server) for every supported layout, fed
// values as a replay or the live wrapper would: each mapped water temperature shows in the viewer's
// units, each state shows as a glyph and a word (ISA-101: state never by colour alone), the margin
// bar reads against its minimum, the lockout counts down, stale values are marked by a shape.
import { createElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { pointsByKind, type EquipmentKind } from "@/lib/quantities";
import { overviewLayout, type OverviewEquipmentInput, type OverviewVariant } from "@/lib/plant/overview-layout";
import { PlantOverview, type OverviewPointValue } from "@/components/plant-overview/plant-overview";

function plant(chillers: number, towers: number) {
  let id = 1;
  const values: Record<number, OverviewPointValue> = {};
  const eq: OverviewEquipmentInput[] = [];
  // 6.7 °C = 44.06 °F (exact conversion °F = °C × 9/5 + 32) on every temperature; pumps in hand, fans faulted.
  const valueOf: Partial<Record<string, number | boolean | string>> = {
    run_status: true,
    pump_status: true,
    pump_run_command: false,
    fan_drive_fault: true,
    fan_drive_mode: "auto",
  };
  const add = (tag: string, kind: EquipmentKind, extra: Partial<OverviewEquipmentInput> = {}) => {
    const points = pointsByKind[kind].map((quantity) => {
      const pid = id++;
      const v = quantity.endsWith("_temp") ? 6.7 : valueOf[quantity];
      if (v !== undefined) values[pid] = { value: v, tsMs: 1, stale: false };
      return { id: pid, quantity };
    });
    eq.push({ tag, kind, serves: null, ...extra, points });
  };
  for (let i = 1; i <= chillers; i++) {
    add(`CH-${i}`, "chiller");
    add(`CHWP-${i}`, "pump", { serves: `CH-${i}`, loop: "chilled_water" });
    add(`CWP-${i}`, "pump", { serves: `CH-${i}`, loop: "condenser_water" });
  }
  for (let i = 1; i <= towers; i++) add(`CT-${i}`, "cooling_tower");
  add("AHU-1", "air_handler");
  return { eq, values };
}

function render(variant: OverviewVariant, chillers: number, towers: number, unitSystem: "ip" | "si" = "ip") {
  const { eq, values } = plant(chillers, towers);
  const model = overviewLayout(eq, variant);
  const html = renderToStaticMarkup(
    createElement(PlantOverview, {
      model,
      values,
      chillers: {
        "CH-1": { marginK: -0.5, minMarginK: 2, lockoutLeftS: 245, crossover: { status: "crossed" } },
        "CH-2": { marginK: 1, minMarginK: 2, lockoutLeftS: 0, crossover: { status: "closing", seconds: 720 } },
      },
      changedTags: ["CT-1", "CH-1"],
      unitSystem,
      trendHref: "/sites/s/points/",
      dataState: "live",
      label: "Test plant",
    }),
  );
  return { html, model };
}

const count = (html: string, s: string) => html.split(s).length - 1;

describe("plant overview component", () => {
  for (const variant of ["narrow", "wide"] as const)
    for (const chillers of [1, 2, 3, 4])
      for (const towers of [1, 2])
        it(`${variant}: ${chillers} chiller(s), ${towers} tower(s) draw every value and state`, () => {
          const { html, model } = render(variant, chillers, towers);
          // Four water temperatures per chiller and two per tower, each a link to its trend.
          expect(count(html, ">44.1 °F</tspan>")).toBe(4 * chillers + 2 * towers);
          expect(count(html, 'href="/sites/s/points/')).toBe(model.values.length);
          expect(count(html, "▶ RUN")).toBe(chillers);
          expect(count(html, "◐ HAND")).toBe(2 * chillers);
          expect(count(html, "◆ FAN FAULT")).toBe(towers);
          expect(html).toContain("Restart lockout 4:05 left");
          expect(html).toContain("LOOPS CROSSED");
          expect(count(html, "⚑ CHANGE")).toBe(2);
          if (chillers > 1) {
            expect(html).toContain("BELOW MIN");
            expect(html).toContain("Crossover in about 12 min");
          }
        });

  it("shows values in SI for an SI viewer: 6.7 °C", () => {
    const { html } = render("narrow", 1, 1, "si");
    expect(count(html, ">6.7 °C</tspan>")).toBe(6);
  });

  it("marks stale values with a dashed underline and says so in the value's title", () => {
    const { eq, values } = plant(1, 1);
    for (const v of Object.values(values)) v.stale = true;
    const html = renderToStaticMarkup(
      createElement(PlantOverview, {
        model: overviewLayout(eq, "narrow"),
        values,
        chillers: {},
        changedTags: [],
        unitSystem: "ip",
        trendHref: "/t/",
        dataState: "stale",
        label: "x",
      }),
    );
    expect(count(html, 'data-stale="true"')).toBe(6);
    expect(count(html, 'stroke-dasharray="2 2"')).toBe(6);
    expect(count(html, "(stale)")).toBe(6);
    // A stale state is not trusted: the chiller reads "no data", not "run".
    expect(html).toContain("○ NO DATA");
    expect(html).not.toContain("⚑ CHANGE");
  });
});
