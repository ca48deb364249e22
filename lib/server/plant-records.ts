import type { Db } from "@/db/client";
import { insertCustomer, setCustomerRetired, updateCustomer } from "@/db/queries/customers";
import { insertEquipment, setChillerLimits, setEquipmentRetired, updateEquipment } from "@/db/queries/equipment";
import { insertSite, setSiteRetired, siteGatewayIds, updateSite } from "@/db/queries/sites";
import type { Viewer } from "@/lib/auth/viewer";
import { customerPatchSchema, customerSchema } from "@/lib/schemas/customers";
import { chillerLimitsSchema, equipmentPatchSchema } from "@/lib/schemas/equipment";
import { sitePatchSchema, siteSchema } from "@/lib/schemas/sites";
import { getRuntime } from "./runtime";

// Customers, sites and equipment as whole acts: validate, write with its audit entry in one
// transaction, then tell the running server (rule checks, gateway side). Routes, pages' actions
// and the demo seed call these, so none can write a record and forget the rest.

/** A site's rules take up its equipment and limits at once (keeping its reading history). */
function reloadRules(siteId: string): void {
  getRuntime()?.alarms.reload(siteId);
}

/** A retired site's gateways are cut off and refused at CONNECT; a restored one's may connect again. */
function siteGatewaysChanged(db: Db, siteId: string): void {
  const runtime = getRuntime();
  if (!runtime) return;
  for (const gatewayId of siteGatewayIds(db, siteId)) runtime.gatewayChanged(gatewayId, "revoked");
}

// ---- Customers ----

/** `id` only for the demo seed's fixed ids. */
export function createCustomer(db: Db, viewer: Viewer, input: unknown, opts: { id?: string } = {}) {
  return insertCustomer(db, viewer, customerSchema.parse(input), opts.id);
}

export function editCustomer(db: Db, viewer: Viewer, customerId: string, input: unknown) {
  return updateCustomer(db, viewer, customerId, customerPatchSchema.parse(input));
}

/** Retires the customer and its sites: off the board, rules stopped, gateways refused. */
export function retireCustomer(db: Db, viewer: Viewer, customerId: string) {
  const result = setCustomerRetired(db, viewer, customerId, true);
  for (const siteId of result.siteIds) {
    reloadRules(siteId);
    siteGatewaysChanged(db, siteId);
  }
  return result;
}

/** Restores the customer and the sites retired with it. */
export function restoreCustomer(db: Db, viewer: Viewer, customerId: string) {
  const result = setCustomerRetired(db, viewer, customerId, false);
  for (const siteId of result.siteIds) {
    reloadRules(siteId);
    siteGatewaysChanged(db, siteId);
  }
  return result;
}

// ---- Sites ----

export function createSite(db: Db, viewer: Viewer, input: unknown, opts: { id?: string } = {}) {
  return insertSite(db, viewer, siteSchema.parse(input), opts.id);
}

export function editSite(db: Db, viewer: Viewer, siteId: string, input: unknown) {
  const site = updateSite(db, viewer, siteId, sitePatchSchema.parse(input));
  // The time zone appears in alarm messages.
  reloadRules(siteId);
  return site;
}

/** Keeps the site's history; hides it from the board and lists, stops its rules, refuses its gateways. */
export function retireSite(db: Db, viewer: Viewer, siteId: string) {
  const site = setSiteRetired(db, viewer, siteId, true);
  if (site) {
    reloadRules(siteId);
    siteGatewaysChanged(db, siteId);
  }
  return site;
}

export function restoreSite(db: Db, viewer: Viewer, siteId: string) {
  const site = setSiteRetired(db, viewer, siteId, false);
  if (site) {
    reloadRules(siteId);
    siteGatewaysChanged(db, siteId);
  }
  return site;
}

// ---- Equipment ----

export function createEquipment(db: Db, viewer: Viewer, siteId: string, input: unknown) {
  const created = insertEquipment(db, viewer, siteId, input);
  reloadRules(siteId);
  return created;
}

export function editEquipment(db: Db, viewer: Viewer, equipmentId: string, input: unknown) {
  const updated = updateEquipment(db, viewer, equipmentId, equipmentPatchSchema.parse(input));
  reloadRules(updated.siteId);
  return updated;
}

/** Off the site model the rules see; its points and history stay. */
export function retireEquipment(db: Db, viewer: Viewer, equipmentId: string) {
  const retired = setEquipmentRetired(db, viewer, equipmentId, true);
  if (retired) reloadRules(retired.siteId);
  return retired;
}

export function restoreEquipment(db: Db, viewer: Viewer, equipmentId: string) {
  const restored = setEquipmentRetired(db, viewer, equipmentId, false);
  if (restored) reloadRules(restored.siteId);
  return restored;
}

/**
 * Enters or clears a chiller's limits ({ values: { key: number | null } }); the rules use them
 * from the site's next reading, without a restart and without losing the site's history.
 */
export function setEquipmentLimits(db: Db, viewer: Viewer, equipmentId: string, input: unknown) {
  const { values } = chillerLimitsSchema.parse(input);
  const result = setChillerLimits(db, viewer, equipmentId, values);
  if (result.changed.length) reloadRules(result.equipment.siteId);
  return result;
}
