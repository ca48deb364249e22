import { z } from "zod";
import { chillerLimitKeys, compressorTypes, type ChillerLimitKey } from "@/lib/plant/equipment-limits";
import { KW_PER_TON } from "@/lib/plant/units";
import { refrigerants } from "@/lib/refrigerant";
import { safeText } from "./text";

// Request shapes for equipment records, one per kind; shared with the equipment form. Canonical
// units: L/s, °C, kPa, kW, tons (lib/quantities.ts).

/** Short and stable: it names the equipment in point maps, alarms and CSV files. */
export const equipmentTagPattern = /^[A-Z0-9][A-Z0-9-]{0,15}$/i;
/** What an air handler serves: the chilled-water loop as a whole, not one chiller. */
export const CHW_LOOP = "chw-loop";

const tag = z
  .string()
  .trim()
  .regex(equipmentTagPattern, "1–16 letters, digits or dashes, starting with a letter or digit (e.g. CH-1)");
const name = safeText(z.string().trim().min(1, "Enter a name").max(120));
const nameplate = safeText(z.string().trim().max(120)).optional();
const positive = (max: number) => z.number().positive().max(max);
const tempC = (min: number, max: number) => z.number().min(min).max(max);

/** Pumps and towers serve one chiller, named by its tag at the same site; null for a common header. */
const servesChiller = tag.nullable().default(null);

const chiller = z.strictObject({
  kind: z.literal("chiller"),
  tag,
  name,
  serves: z.null().default(null),
  /** Nominal capacity: tons or kW, one of them; stored as tons. */
  capacityTons: positive(10_000).optional(),
  capacityKW: positive(35_000).optional(),
  refrigerant: z.enum(refrigerants),
  compressorType: z.enum(compressorTypes),
  /** Design flows (L/s) and water temperatures (°C) from the selection or the nameplate. */
  chwDesignFlowLps: positive(2_000).nullish(),
  cwDesignFlowLps: positive(2_500).nullish(),
  chwEnteringDesignC: tempC(0, 30).nullish(),
  chwLeavingDesignC: tempC(-10, 25).nullish(),
  cwEnteringDesignC: tempC(5, 45).nullish(),
  cwLeavingDesignC: tempC(5, 55).nullish(),
  /** Water pressure drop across each barrel at its design flow (kPa), as the selection states it. */
  evapDesignDpKPa: positive(500).nullish(),
  condDesignDpKPa: positive(500).nullish(),
  model: nameplate,
  serial: nameplate,
  year: nameplate,
});

const coolingTower = z.strictObject({
  kind: z.literal("cooling_tower"),
  tag,
  name,
  serves: servesChiller,
  capacityTons: positive(20_000),
  fanDrive: z.enum(["single_speed", "variable_speed"]),
  condenserWaterSetpointC: tempC(5, 40),
  /** The fan's low speed limit; only a variable-speed drive has one. */
  fanMinSpeedPct: z.number().min(0).max(100).nullish(),
  model: nameplate,
  serial: nameplate,
  year: nameplate,
});

const pump = z.strictObject({
  kind: z.literal("pump"),
  tag,
  name,
  serves: servesChiller,
  designFlowLps: positive(2_500),
  designHeadKPa: positive(2_000),
  loop: z.enum(["chilled_water", "condenser_water"]),
  model: nameplate,
  serial: nameplate,
  year: nameplate,
});

const airHandler = z.strictObject({
  kind: z.literal("air_handler"),
  tag,
  name,
  serves: z.literal(CHW_LOOP).nullable().default(CHW_LOOP),
  designAirflowLps: positive(200_000).nullish(),
  coilCapacityKW: positive(10_000).nullish(),
  model: nameplate,
  serial: nameplate,
  year: nameplate,
});

const weatherStation = z.strictObject({
  kind: z.literal("weather_station"),
  tag,
  name,
  serves: z.null().default(null),
  model: nameplate,
  serial: nameplate,
  year: nameplate,
});

export const equipmentKindSchemas = {
  chiller,
  cooling_tower: coolingTower,
  pump,
  air_handler: airHandler,
  weather_station: weatherStation,
};

const equipmentUnion = z.discriminatedUnion("kind", [chiller, coolingTower, pump, airHandler, weatherStation]);

/** A chiller's capacity arrives as tons or kW; what is stored is tons. */
function normalize(v: z.infer<typeof equipmentUnion>) {
  if (v.kind !== "chiller") return v;
  const { capacityKW, ...rest } = v;
  const tons = v.capacityTons ?? (capacityKW !== undefined ? capacityKW / KW_PER_TON : undefined);
  return { ...rest, capacityTons: Math.round(tons! * 100) / 100 };
}

export const equipmentSchema = equipmentUnion
  .superRefine((v, ctx) => {
    if (v.kind !== "chiller") return;
    if (v.capacityTons === undefined && v.capacityKW === undefined)
      ctx.addIssue({ code: "custom", path: ["capacityTons"], message: "Enter the capacity in tons or kW" });
    // An evaporator cools the water it takes; a condenser warms it.
    if (v.chwEnteringDesignC != null && v.chwLeavingDesignC != null && v.chwLeavingDesignC >= v.chwEnteringDesignC)
      ctx.addIssue({
        code: "custom",
        path: ["chwLeavingDesignC"],
        message: "Chilled water must leave colder than it enters",
      });
    if (v.cwEnteringDesignC != null && v.cwLeavingDesignC != null && v.cwLeavingDesignC <= v.cwEnteringDesignC)
      ctx.addIssue({
        code: "custom",
        path: ["cwLeavingDesignC"],
        message: "Condenser water must leave warmer than it enters",
      });
  })
  .transform(normalize);

export type EquipmentInput = z.input<typeof equipmentSchema>;
export type EquipmentBody = z.output<typeof equipmentSchema>;
export type ChillerInput = z.input<typeof chiller>;
export type CoolingTowerInput = z.input<typeof coolingTower>;
export type PumpInput = z.input<typeof pump>;
export type AirHandlerInput = z.input<typeof airHandler>;
export type WeatherStationInput = z.input<typeof weatherStation>;

/**
 * An edit: any fields of the equipment's kind (the kind itself cannot change). The server merges
 * them over the stored record and validates the whole with `equipmentSchema`.
 */
export const equipmentPatchSchema = z.record(z.string(), z.unknown()).refine((v) => !("kind" in v), {
  message: "The kind of a piece of equipment cannot change; retire it and add a new one",
  path: ["kind"],
});
export type EquipmentPatchInput = Partial<Omit<ChillerInput, "kind">> &
  Partial<Omit<CoolingTowerInput, "kind">> &
  Partial<Omit<PumpInput, "kind">> &
  Partial<Omit<AirHandlerInput, "kind">>;

// ---- Entered chiller limits ----

/** The range a value from a nameplate or controller can plausibly take, per key (canonical units). */
export const chillerLimitRanges: Record<ChillerLimitKey, { min: number; max: number; integer?: boolean }> = {
  // kPa absolute: below 200 no refrigerant here condenses above ambient; above 2500 is past these chillers' shells.
  highCondPressureCutoutKPa: { min: 200, max: 2500 },
  lowEvapTempCutoutC: { min: -10, max: 10 },
  driveTempTripC: { min: 30, max: 120 },
  minStartLiftKPa: { min: 0, max: 1000 },
  startToStartS: { min: 0, max: 7200 },
  stopToStartS: { min: 0, max: 7200 },
  minStartToStartS: { min: 0, max: 3600 },
  minStopToStartS: { min: 0, max: 3600 },
  maxStartsPerHour: { min: 1, max: 12, integer: true },
};

const limitValue = (key: ChillerLimitKey) => {
  const r = chillerLimitRanges[key];
  const n = z.number().min(r.min).max(r.max);
  return (r.integer ? n.int() : n).nullable().optional();
};

/** PUT …/limits: each named key gets the value entered, or null to go back to its default. */
export const chillerLimitsSchema = z.strictObject({
  values: z.strictObject(
    Object.fromEntries(chillerLimitKeys.map((k) => [k, limitValue(k)])) as Record<
      ChillerLimitKey,
      ReturnType<typeof limitValue>
    >,
  ),
});
export type ChillerLimitsInput = z.input<typeof chillerLimitsSchema>;

export const equipmentParams = z.object({ equipmentId: z.string().min(1).max(200) });
