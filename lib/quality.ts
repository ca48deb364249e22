/** A reading's quality; its index is the code stored with the reading. */
export const qualityNames = ["good", "uncertain", "bad"] as const;
export type Quality = (typeof qualityNames)[number];
