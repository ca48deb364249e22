// Who is asking. Every query that returns tenant data takes a Viewer and filters by it.
export const roles = ["admin", "technician", "customer"] as const;
export type Role = (typeof roles)[number];

export interface Viewer {
  userId: string;
  role: Role;
  organizationId: string;
  name: string;
  email: string;
  unitSystem: "ip" | "si";
}

/** Staff of the service company see every customer's sites; a customer sees only its own. */
export function seesAllSites(viewer: Pick<Viewer, "role">): boolean {
  return viewer.role === "admin" || viewer.role === "technician";
}

/** Acting on alarms and plants is for the service company's staff. */
export function canAct(viewer: Pick<Viewer, "role">): boolean {
  return viewer.role === "admin" || viewer.role === "technician";
}

export function isAdmin(viewer: Pick<Viewer, "role">): boolean {
  return viewer.role === "admin";
}

/** The server acting on its own (demo provisioning, board summaries): the service company's full view. */
export function systemViewer(serviceOrganizationId: string): Viewer {
  return {
    userId: "system",
    role: "admin",
    organizationId: serviceOrganizationId,
    name: "Liftline",
    email: "system@liftline.invalid",
    unitSystem: "ip",
  };
}
