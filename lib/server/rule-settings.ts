import type { Db } from "@/db/client";
import { saveRuleOverrides } from "@/db/queries/alarms";
import type { Viewer } from "@/lib/auth/viewer";
import { ruleSettingsSchema } from "@/lib/rules/settings";
import { getRuntime } from "./runtime";

/**
 * Replaces a site's rule-setting overrides (every field validated, unknown keys refused) and
 * makes the running rule checks take them up with the site's next readings.
 */
export function saveRuleSettings(db: Db, viewer: Viewer, siteId: string, overrides: Record<string, unknown>) {
  const effective = ruleSettingsSchema.parse(overrides);
  saveRuleOverrides(db, viewer, siteId, overrides);
  getRuntime()?.alarms.reload(siteId);
  return { overrides, effective };
}
