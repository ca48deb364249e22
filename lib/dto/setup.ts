/** Counts behind the first-run checklist. */
export interface SetupProgress {
  customers: number;
  sites: number;
  equipment: number;
  gateways: number;
  mappedPoints: number;
  /** People other than the administrator looking. */
  otherPeople: number;
}
