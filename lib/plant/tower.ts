// Cooling-tower performance (REFERENCES.md §5 [C]; CTI terminology).

/** Range = hot water in − cold water out (K). A tower's entering water is the hot condenser water. */
export function towerRangeK(towerEnteringC: number, towerLeavingC: number): number {
  return towerEnteringC - towerLeavingC;
}

/** Approach = cold water out − entering-air wet bulb (K). */
export function towerApproachK(towerLeavingC: number, wetBulbC: number): number {
  return towerLeavingC - wetBulbC;
}
