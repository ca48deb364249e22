import type { Role } from "./viewer";

declare module "next-auth" {
  interface User {
    role: Role;
    organizationId: string;
  }
  interface Session {
    user: { id: string; name: string; email: string; role: Role; organizationId: string };
  }
}

declare module "next-auth/jwt" {
  interface JWT {
    role: Role;
    organizationId: string;
    /** The sessions row this token belongs to (db/queries/sessions.ts). */
    sid?: string;
  }
}
