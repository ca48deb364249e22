import { describe, expect, it } from "vitest";
import { auditChanges } from "@/lib/audit-diff";

describe("auditChanges", () => {
  it("lists only the fields that changed", () => {
    expect(
      auditChanges(
        { role: "technician", organizationId: "org-a", status: "active" },
        { role: "customer", organizationId: "org-b", status: "active" },
      ),
    ).toEqual([
      { field: "organizationId", before: "org-a", after: "org-b" },
      { field: "role", before: "technician", after: "customer" },
    ]);
  });

  it("flattens nested settings to dotted paths and shows added or removed fields with a dash", () => {
    expect(
      auditChanges(
        { crossoverRisk: { warnTimeToCrossoverS: 600 } },
        { crossoverRisk: { warnTimeToCrossoverS: 900, horizonS: 1800 } },
      ),
    ).toEqual([
      { field: "crossoverRisk.horizonS", before: "—", after: "1800" },
      { field: "crossoverRisk.warnTimeToCrossoverS", before: "600", after: "900" },
    ]);
  });

  it("a created record lists every field; an unchanged one lists none", () => {
    expect(auditChanges(null, { name: "CH-1", scope: "read" }).map((c) => c.field)).toEqual(["name", "scope"]);
    expect(auditChanges({ a: [1, 2] }, { a: [1, 2] })).toEqual([]);
    expect(auditChanges(null, null)).toEqual([]);
  });

  it("cuts long values", () => {
    const [change] = auditChanges({ map: "x".repeat(500) }, { map: "y" });
    expect(change.before.length).toBe(200);
    expect(change.before.endsWith("…")).toBe(true);
  });
});
