import type { Condition } from "./condition";

type Required = Pick<
  Condition,
  "ruleId" | "equipment" | "active" | "priority" | "atMs" | "technicianMessage" | "ownerMessage"
>;

export function makeCondition(c: Required & Partial<Condition>): Condition {
  return { advice: [], caution: null, numbers: {}, related: [], latching: false, suppressedReason: null, ...c };
}
