import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { Parser, type Quad } from "n3";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { migrateDb, openDb, type Db } from "@/db/client";
import { siteModel } from "@/db/queries/points";
import { DEMO_SITES, SERVICE_ORG, seedDemo } from "@/db/seed/demo";
import { systemViewer, type Viewer } from "@/lib/auth/viewer";
import { BRICK, brickEquipmentClass, brickTurtle, QUDT_UNIT, RDF, RDFS } from "@/lib/open-formats/brick";
import { haystackGrid, pointTags } from "@/lib/open-formats/haystack";
import type { SiteModel } from "@/lib/open-formats/model";
import { quantities, type QuantityKey } from "@/lib/quantities";

// Every check of a class or tag here is against plant-reference.md §9 (Brick 1.4 classes,
// Project Haystack 4 tags) or the Brick / Haystack specifications named beside it.

let db: Db;
let model: SiteModel;
const admin = systemViewer(SERVICE_ORG.id);
const site = DEMO_SITES[0];

beforeAll(() => {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "liftline-open-formats-"));
  db = openDb(path.join(dir, "test.db"));
  migrateDb(db);
  seedDemo(db, "open-formats-test-password");
  model = siteModel(db, admin, site.id);
});
afterAll(() => db.$client.close());

describe("site model", () => {
  it("reads the demo site's equipment and points, and hides another customer's site (404)", () => {
    expect(model.equipment.map((e) => e.tag).sort()).toEqual(site.equipment.map((e) => e.tag).sort());
    expect(model.points.length).toBeGreaterThan(30);
    const otherCustomer: Viewer = {
      userId: "u-x",
      role: "customer",
      organizationId: DEMO_SITES[1].customer.id,
      name: "x",
      email: "x@example.invalid",
      unitSystem: "si",
    };
    expect(() => siteModel(db, otherCustomer, site.id)).toThrow(/No such site/);
    const ownCustomer = { ...otherCustomer, organizationId: site.customer.id };
    expect(siteModel(db, ownCustomer, site.id).points).toHaveLength(model.points.length);
  });
});

describe("Brick Turtle", () => {
  let quads: Quad[];
  beforeAll(async () => {
    const turtle = await brickTurtle(model);
    expect(turtle).toContain("@prefix brick: <https://brickschema.org/schema/Brick#>");
    quads = new Parser({ format: "text/turtle" }).parse(turtle);
  });
  const objects = (s: string, p: string) =>
    quads.filter((q) => q.subject.value === s && q.predicate.value === p).map((q) => q.object.value);
  const subjectsOfType = (cls: string) =>
    quads
      .filter((q) => q.predicate.value === `${RDF}type` && q.object.value === BRICK + cls)
      .map((q) => q.subject.value);

  it("parses back with every point, its Brick class and its equipment (brick:isPointOf / brick:hasPoint)", () => {
    const pointSubjects = quads.filter((q) => q.predicate.value === `${BRICK}isPointOf`).map((q) => q.subject.value);
    expect(new Set(pointSubjects).size).toBe(model.points.length);
    const tagOf = new Map(model.equipment.map((e) => [e.id, e.tag]));
    for (const p of model.points) {
      const tag = tagOf.get(p.equipmentId)!;
      const [subject] = quads
        .filter((q) => q.predicate.value === `${RDFS}label` && q.object.value === `${tag} ${p.key}`)
        .map((q) => q.subject.value);
      expect(subject, `${tag} ${p.key}`).toBeDefined();
      // The class is the one lib/quantities.ts gives (plant-reference.md §9).
      expect(objects(subject, `${RDF}type`)).toEqual([BRICK + quantities[p.quantity as QuantityKey].brickClass]);
      const [equip] = objects(subject, `${BRICK}isPointOf`);
      expect(objects(equip, `${RDFS}label`)).toEqual([model.equipment.find((e) => e.tag === tag)!.name]);
      expect(objects(equip, `${BRICK}hasPoint`)).toContain(subject);
    }
  });

  it("names the plant's classes as Brick 1.4 does and places every equipment at the brick:Site", () => {
    const [siteNode] = subjectsOfType("Site");
    expect(objects(siteNode, `${RDFS}label`)).toEqual([site.name]);
    // plant-reference.md §9: Leaving_Chilled_Water_Temperature_Sensor etc.; pumps as Chilled_Water_Pump / Condenser_Water_Pump.
    expect(subjectsOfType("Chiller").length).toBe(site.equipment.filter((e) => e.kind === "chiller").length);
    expect(subjectsOfType("Cooling_Tower")).toHaveLength(1);
    expect(subjectsOfType("Chilled_Water_Pump").length).toBeGreaterThan(0);
    expect(subjectsOfType("Condenser_Water_Pump").length).toBeGreaterThan(0);
    expect(subjectsOfType("Weather_Station")).toHaveLength(1);
    expect(subjectsOfType("Leaving_Chilled_Water_Temperature_Sensor").length).toBeGreaterThan(0);
    for (const e of model.equipment) {
      const [node] = quads
        .filter((q) => q.predicate.value === `${RDFS}label` && q.object.value === e.name)
        .map((q) => q.subject.value);
      expect(objects(node, `${BRICK}hasLocation`)).toEqual([siteNode]);
    }
  });

  it("says which equipment feeds which: pumps and the tower feed their chiller, a chiller feeds the air handlers", () => {
    const nodeOf = (tag: string) =>
      quads.find(
        (q) =>
          q.predicate.value === `${RDFS}label` && q.object.value === model.equipment.find((e) => e.tag === tag)!.name,
      )!.subject.value;
    const pump = site.equipment.find((e) => e.kind === "pump" && e.serves)!;
    expect(objects(nodeOf(pump.tag), `${BRICK}feeds`)).toEqual([nodeOf(pump.serves!)]);
    const chiller = site.equipment.find((e) => e.kind === "chiller")!;
    expect(objects(nodeOf("CT-1"), `${BRICK}feeds`)).toContain(nodeOf(chiller.tag));
    const ahus = site.equipment.filter((e) => e.kind === "air_handler").map((e) => nodeOf(e.tag));
    expect(objects(nodeOf(chiller.tag), `${BRICK}feeds`).sort()).toEqual(ahus.sort());
  });

  it("gives numeric points their QUDT unit (qudt.org/vocab/unit DEG_C, KiloPA)", () => {
    const units = new Set(quads.filter((q) => q.predicate.value === `${BRICK}hasUnit`).map((q) => q.object.value));
    expect(units).toContain(`${QUDT_UNIT}DEG_C`);
    expect(units).toContain(`${QUDT_UNIT}KiloPA`);
  });

  it("classes a pump by its loop, from the record before the name", () => {
    expect(brickEquipmentClass({ kind: "pump", name: "P-7", record: { loop: "condenser_water" } })).toBe(
      "Condenser_Water_Pump",
    );
    expect(brickEquipmentClass({ kind: "pump", name: "Chilled water pump 2", record: {} })).toBe("Chilled_Water_Pump");
    expect(brickEquipmentClass({ kind: "pump", name: "P-7", record: {} })).toBe("Pump");
  });
});

describe("Haystack grid", () => {
  it("is a JSON-encoded grid whose every point has an equipRef and a siteRef that resolve", () => {
    const grid = haystackGrid(model);
    expect(grid.meta.ver).toBe("3.0");
    const colNames = new Set(grid.cols.map((c) => c.name));
    for (const row of grid.rows) for (const k of Object.keys(row)) expect(colNames).toContain(k);
    // Refs are "r:<id> <dis>" (Haystack JSON encoding); compare by id.
    const idOf = (ref: unknown) => String(ref).slice(2).split(" ")[0];
    const ids = new Map(grid.rows.map((r) => [idOf(r.id), r]));
    expect(ids.size).toBe(grid.rows.length);
    const pointRows = grid.rows.filter((r) => r.point === "m:");
    expect(pointRows).toHaveLength(model.points.length);
    for (const p of pointRows) {
      expect(p.his).toBe("m:");
      const equip = ids.get(idOf(p.equipRef));
      expect(equip?.equip, String(p.id)).toBe("m:");
      expect(ids.get(idOf(p.siteRef))?.site).toBe("m:");
      expect(equip?.siteRef).toBe(p.siteRef);
    }
    const sites = grid.rows.filter((r) => r.site === "m:");
    expect(sites).toHaveLength(1);
    expect(sites[0].tz).toBe("Chicago"); // Haystack tz names are the IANA name's city part.
  });

  it("tags chilled water leaving temp as plant-reference.md §9 lists it", () => {
    const grid = haystackGrid(model);
    const row = grid.rows.find((r) => String(r.id).includes(".chilled_water_leaving_temp "))!;
    for (const t of ["chilled", "water", "leaving", "temp", "sensor", "point"]) expect(row[t], t).toBe("m:");
    expect(row.unit).toBe("°C");
    expect(row.kind).toBe("Number");
    expect(grid.rows.filter((r) => r.chiller === "m:").length).toBeGreaterThan(0);
    expect(grid.rows.filter((r) => r.coolingTower === "m:")).toHaveLength(1);
    expect(grid.rows.filter((r) => r.ahu === "m:").length).toBeGreaterThan(0);
    // Haystack 4 never says supply/return for water.
    for (const tags of Object.values(pointTags)) expect(tags.some((t) => t === "supply" || t === "return")).toBe(false);
  });
});
