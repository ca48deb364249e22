// Refrigerant saturation curves: pressure ↔ temperature on the saturated-liquid/vapour line.
// Pure functions, SI units (°C, kPa absolute). Used by the simulator and by derived values.
//
// Each pure fluid uses a published vapour-pressure ancillary of the form
//   ln(p / pc) = (Tc / T) · Σ nᵢ θ^tᵢ,   θ = 1 − T / Tc
// which is how NIST's reference equations of state publish their saturation-line fits.

export const refrigerants = ["R-134a", "R-1234ze(E)", "R-513A"] as const;
export type Refrigerant = (typeof refrigerants)[number];

interface Ancillary {
  tcK: number;
  pcKPa: number;
  n: readonly number[];
  t: readonly number[];
}

// R-134a: CoolProp ancillary fitted to the Tillner-Roth & Baehr (1994) equation of state
// (J. Phys. Chem. Ref. Data 23:657); stated max error 0.0092 % (REFERENCES.md §1).
const r134a: Ancillary = {
  tcK: 374.21,
  pcKPa: 4059.28,
  n: [
    0.4331478287291047, -9.090302559074352, 2.1476074125217703, -1.557687007603464, -3.5020328972698604,
    14.958442337201044,
  ],
  t: [0.845, 0.99, 1.14, 2.651, 4.507, 17.235],
};

// R-1234ze(E): Thol & Lemmon (2016), Int. J. Thermophys. 37:28, vapour-pressure ancillary;
// Tc = 382.513 K, pc = 3634.9 kPa (REFERENCES.md §1). Reproduces the normal boiling point
// −18.973 °C to 0.01 kPa.
const r1234zeE: Ancillary = {
  tcK: 382.513,
  pcKPa: 3634.9,
  n: [-7.5888, 1.9696, -2.0827, -4.1238],
  t: [1.0, 1.5, 2.2, 4.6],
};

// R-1234yf (a component of R-513A): Richter, McLinden & Lemmon (2011), J. Chem. Eng. Data 56:3254,
// vapour-pressure ancillary; Tc = 367.85 K, pc = 3382.2 kPa.
const r1234yf: Ancillary = {
  tcK: 367.85,
  pcKPa: 3382.2,
  n: [-7.4697, 2.7915, -2.1312, -2.9531],
  t: [1.0, 1.5, 1.8, 3.8],
};

// R-513A = 56 % R-1234yf / 44 % R-134a by mass (REFERENCES.md §1), near-azeotropic (glide < 0.05 K),
// treated as a pseudo-pure fluid: Raoult's-law mix of the components times a constant factor for
// the positive azeotrope. The 1.05 factor is recalled, not verified (approximate, ±3 %).
const r513aMoleFractionYf = 0.56 / 114.0416 / (0.56 / 114.0416 + 0.44 / 102.032);
const r513aAzeotropeFactor = 1.05;

function ancillaryPressureKPa(a: Ancillary, tempC: number): number {
  const tK = tempC + 273.15;
  const theta = 1 - tK / a.tcK;
  if (theta <= 0) return a.pcKPa; // at or above the critical point: clamp
  let sum = 0;
  for (let i = 0; i < a.n.length; i++) sum += a.n[i] * Math.pow(theta, a.t[i]);
  return a.pcKPa * Math.exp((a.tcK / tK) * sum);
}

/** Saturation pressure in kPa absolute at a saturation temperature in °C. */
export function saturationPressureKPa(refrigerant: Refrigerant, tempC: number): number {
  switch (refrigerant) {
    case "R-134a":
      return ancillaryPressureKPa(r134a, tempC);
    case "R-1234ze(E)":
      return ancillaryPressureKPa(r1234zeE, tempC);
    case "R-513A": {
      const x = r513aMoleFractionYf;
      return (
        r513aAzeotropeFactor * (x * ancillaryPressureKPa(r1234yf, tempC) + (1 - x) * ancillaryPressureKPa(r134a, tempC))
      );
    }
  }
}

/** Saturation temperature in °C at a pressure in kPa absolute (inverse of the curve, Newton on ln p). */
export function saturationTempC(refrigerant: Refrigerant, pressureKPa: number): number {
  const p = Math.max(pressureKPa, 1);
  const lnP = Math.log(p);
  // Start from an Antoine-like guess for R-134a (ln p = 14.41 − 2094/(T − 33.06), REFERENCES.md §1).
  let tK = 2094 / (14.41 - lnP) + 33.06;
  if (!Number.isFinite(tK) || tK < 150) tK = 150;
  if (tK > 370) tK = 370;
  for (let i = 0; i < 30; i++) {
    const f = Math.log(saturationPressureKPa(refrigerant, tK - 273.15)) - lnP;
    const h = 0.01;
    const df =
      (Math.log(saturationPressureKPa(refrigerant, tK - 273.15 + h)) -
        Math.log(saturationPressureKPa(refrigerant, tK - 273.15 - h))) /
      (2 * h);
    const step = f / df;
    tK -= step;
    if (Math.abs(step) < 1e-7) break;
  }
  return tK - 273.15;
}
