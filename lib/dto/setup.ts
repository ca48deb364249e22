/** Counts behind the first-run checklist. */
export interface SetupProgress {
  customers: number;
  sites: number;
  equipment: number;
  gateways: number;
  mappedPoints: number;
  /** People other than the administrator looking. */
  otherPeople: number;
  /** The first customer and site in service (by creation), so each step can open the record it continues. */
  firstCustomerId?: string | null;
  firstSiteId?: string | null;
}
