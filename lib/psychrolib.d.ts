// The part of the untyped psychrolib package that lib/psychrometrics.ts uses.
declare module "psychrolib" {
  export interface PsychroLib {
    SI: number;
    SetUnitSystem(system: number): void;
    GetTWetBulbFromRelHum(tDryBulbC: number, relHum: number, pressurePa: number): number;
  }
  const psychrolib: PsychroLib;
  export default psychrolib;
}
