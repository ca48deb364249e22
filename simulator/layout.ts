// Site layouts: what equipment a simulated site has and its design conditions.
// Exported so the server's seed data can provision the same sites and equipment tags.
import type { EquipmentKind } from "@/lib/quantities";
import type { Refrigerant } from "@/lib/refrigerant";

export interface ChillerSpec {
  tag: string; // "CH-1"
  capacityTons: number;
  refrigerant: Refrigerant;
}

export type LoadProfile = "office" | "school" | "constant";

export interface DesignConditions {
  /** AHRI 550/590 (I-P) standard rating: evaporator 54 → 44 °F, condenser 85 °F entering (REFERENCES.md §3). */
  chwSupplyF: number;
  chwReturnF: number;
  cwEnteringF: number;
  /** 2.4 gpm/ton chilled water, 3.0 gpm/ton condenser water (REFERENCES.md §3, §5). */
  chwGpmPerTon: number;
  cwGpmPerTon: number;
  /** Design wet bulb and tower approach, 78 °F / 7 °F (typical design, REFERENCES.md §5 — recalled, not verified). */
  wetBulbF: number;
  towerApproachF: number;
  /** Building peak load as a fraction of installed chiller capacity. */
  peakLoadFraction: number;
}

export interface SiteLayout {
  site: string;
  name: string;
  chillers: ChillerSpec[];
  airHandlers: number;
  loadProfile: LoadProfile;
  design: DesignConditions;
  /** System water volume per installed ton — about 6–10 gal/ton chilled water (common practice). */
  chwLoopGalPerTon: number;
  /** Tower basin plus condenser piping per installed ton: 7 gal/ton, inside the usual 5–10 gal/ton (recalled, not verified). */
  cwLoopGalPerTon: number;
  /** A three-way tower bypass valve that sends condenser water back to the basin past the fill (cold-weather plants). */
  towerBypass: boolean;
  /** High condenser pressure cut-out, psig for R-134a (≈ 116 °F condensing; recalled, not verified). Other refrigerants trip at the same condensing temperature. */
  highCondPressureTripPsig: number;
}

export interface EquipmentDef {
  tag: string;
  kind: EquipmentKind;
  name: string;
}

export const ahriDesign: DesignConditions = {
  chwSupplyF: 44,
  chwReturnF: 54,
  cwEnteringF: 85,
  chwGpmPerTon: 2.4,
  cwGpmPerTon: 3.0,
  wetBulbF: 78,
  towerApproachF: 7,
  peakLoadFraction: 0.9,
};

function layout(
  site: string,
  name: string,
  chillers: Array<[number, Refrigerant]>,
  airHandlers: number,
  loadProfile: LoadProfile,
  peak = 0.9,
  towerBypass = false,
): SiteLayout {
  return {
    site,
    name,
    chillers: chillers.map(([capacityTons, refrigerant], i) => ({ tag: `CH-${i + 1}`, capacityTons, refrigerant })),
    airHandlers,
    loadProfile,
    design: { ...ahriDesign, peakLoadFraction: peak },
    chwLoopGalPerTon: 10,
    cwLoopGalPerTon: 7,
    towerBypass,
    highCondPressureTripPsig: 160,
  };
}

export const defaultLayout: SiteLayout = layout(
  "default",
  "Two-chiller plant",
  [
    [400, "R-134a"],
    [400, "R-134a"],
  ],
  4,
  "office",
);

export const siteLayouts: Record<string, SiteLayout> = {
  default: defaultLayout,
  "medical-office": layout("medical-office", "Medical office building", [[300, "R-134a"]], 3, "office", 0.9),
  "data-hall": layout(
    "data-hall",
    "Data hall",
    [
      [500, "R-134a"],
      [500, "R-1234ze(E)"],
    ],
    6,
    "constant",
    0.85,
    true,
  ),
  school: layout(
    "school",
    "School",
    [
      [250, "R-134a"],
      [250, "R-513A"],
    ],
    4,
    "school",
    0.9,
  ),
};

export function threeChillerLayout(): SiteLayout {
  return layout(
    "three-chiller",
    "Three-chiller plant",
    [
      [500, "R-134a"],
      [500, "R-134a"],
      [500, "R-134a"],
    ],
    6,
    "office",
  );
}

export function getLayout(site: string): SiteLayout | undefined {
  return siteLayouts[site];
}

export const chwPumpTag = (i: number): string => `CHWP-${i + 1}`;
export const cwPumpTag = (i: number): string => `CWP-${i + 1}`;
export const ahuTag = (i: number): string => `AHU-${i + 1}`;
export const towerTag = "CT-1";
export const weatherStationTag = "WS-1";

/** Every piece of equipment of a site, in a stable order. Pumps are dedicated: one CHW and one CW pump per chiller. */
export function equipmentOf(l: SiteLayout): EquipmentDef[] {
  const out: EquipmentDef[] = [];
  l.chillers.forEach((c) =>
    out.push({
      tag: c.tag,
      kind: "chiller",
      name: `Chiller ${c.tag.slice(3)} (${c.capacityTons} tons, ${c.refrigerant})`,
    }),
  );
  out.push({ tag: towerTag, kind: "cooling_tower", name: "Cooling tower" });
  l.chillers.forEach((_, i) => out.push({ tag: chwPumpTag(i), kind: "pump", name: `Chilled water pump ${i + 1}` }));
  l.chillers.forEach((_, i) => out.push({ tag: cwPumpTag(i), kind: "pump", name: `Condenser water pump ${i + 1}` }));
  for (let i = 0; i < l.airHandlers; i++)
    out.push({ tag: ahuTag(i), kind: "air_handler", name: `Air handler ${i + 1}` });
  out.push({ tag: weatherStationTag, kind: "weather_station", name: "Weather station" });
  return out;
}

export const plantTons = (l: SiteLayout): number => l.chillers.reduce((s, c) => s + c.capacityTons, 0);
