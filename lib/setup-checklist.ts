import type { SetupProgress } from "@/lib/dto/setup";

// The order a contractor puts a plant on Liftline: each step needs the one before it.

export interface SetupStep {
  key: "customer" | "site" | "equipment" | "gateway" | "people";
  title: string;
  text: string;
  href: string;
  done: boolean;
}

export function setupSteps(p: SetupProgress): SetupStep[] {
  // Each step opens the record it continues once there is one: the customer for its site, the site for the rest.
  const customerHref = p.firstCustomerId ? `/admin/customers/${encodeURIComponent(p.firstCustomerId)}` : null;
  const siteHref = p.firstSiteId ? `/sites/${encodeURIComponent(p.firstSiteId)}` : null;
  return [
    {
      key: "customer",
      title: "Add a customer",
      text: "The organization that owns the building.",
      href: "/admin/customers",
      done: p.customers > 0,
    },
    {
      key: "site",
      title: "Add a site",
      text: "Address, time zone, who to call and how to get into the plant room after hours.",
      href: customerHref ?? "/admin/customers",
      done: p.sites > 0,
    },
    {
      key: "equipment",
      title: "Add its equipment and points",
      text: "Chillers with their refrigerant and controller limits, towers, pumps, air handlers; then the point list.",
      href: siteHref ? `${siteHref}/setup` : (customerHref ?? "/admin/customers"),
      done: p.equipment > 0,
    },
    {
      key: "gateway",
      title: "Provision a gateway and upload its point map",
      text: "The site's gateway publishes controller points over MQTT; the map names them.",
      href: siteHref ? `${siteHref}/gateways` : "/admin/gateways",
      done: p.gateways > 0 && p.mappedPoints > 0,
    },
    {
      key: "people",
      title: "Invite the people",
      text: "Technicians, other administrators, and the customer's own users.",
      href: "/admin/people",
      done: p.otherPeople > 0,
    },
  ];
}

/** True once every step is done: the board stops sending the administrator to the checklist. */
export function setupComplete(p: SetupProgress): boolean {
  return setupSteps(p).every((s) => s.done);
}
