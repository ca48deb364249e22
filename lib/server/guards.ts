import { canAct, isAdmin, type Viewer } from "@/lib/auth/viewer";
import { AppError } from "@/lib/errors";

// Role checks for staff-only features that belong to no tenant (rota, outbox, health).
export function requireStaff(viewer: Viewer): void {
  if (!canAct(viewer)) throw new AppError("forbidden", "Only the service company's staff can do this.");
}

export function requireAdmin(viewer: Viewer): void {
  if (!isAdmin(viewer)) throw new AppError("forbidden", "Only an admin can do this.");
}
