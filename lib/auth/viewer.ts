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
  /** Set when the request came with an API token: it narrows the role, never widens it. Absent for a browser session. */
  tokenScope?: TokenScope;
}

/** What an API token may do: `read` only GETs, `act` also acts on alarms and plants, `admin` also administers. */
export const tokenScopes = ["read", "act", "admin"] as const;
export type TokenScope = (typeof tokenScopes)[number];

/** The widest scope a role may give its tokens: customers read, technicians act, admins administer. */
export function maxTokenScope(role: Role): TokenScope {
  return role === "admin" ? "admin" : role === "technician" ? "act" : "read";
}

/** The widest scope this viewer may give a new token: its role's, narrowed by the token it came with. */
export function grantableTokenScope(viewer: Pick<Viewer, "role" | "tokenScope">): TokenScope {
  const byRole = maxTokenScope(viewer.role);
  if (!viewer.tokenScope) return byRole;
  return tokenScopes.indexOf(viewer.tokenScope) < tokenScopes.indexOf(byRole) ? viewer.tokenScope : byRole;
}

export function scopeAllows(granted: TokenScope, wanted: TokenScope): boolean {
  return tokenScopes.indexOf(wanted) <= tokenScopes.indexOf(granted);
}

/** Staff of the service company see every customer's sites; a customer sees only its own. */
export function seesAllSites(viewer: Pick<Viewer, "role">): boolean {
  return viewer.role === "admin" || viewer.role === "technician";
}

/** Acting on alarms and plants is for the service company's staff. */
export function canAct(viewer: Pick<Viewer, "role" | "tokenScope">): boolean {
  return (viewer.role === "admin" || viewer.role === "technician") && viewer.tokenScope !== "read";
}

/** An admin's browser session, or an admin's token with the `admin` scope. */
export function isAdmin(viewer: Pick<Viewer, "role" | "tokenScope">): boolean {
  return viewer.role === "admin" && (viewer.tokenScope === undefined || viewer.tokenScope === "admin");
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
