// What people read when the server cannot write its database: the 503 body, the staff banner
// and the admins' e-mail say the same thing.

export type StorageFailureKind = "full" | "io" | "readonly";

const WHY: Record<StorageFailureKind, string> = {
  full: "the server's disk is full",
  io: "the server cannot write to its disk",
  readonly: "the server's database is read-only",
};

/** The sentence people read when their change could not be saved. */
export function unavailableMessage(kind: StorageFailureKind): string {
  return `Liftline cannot save right now: ${WHY[kind]}. Nothing was changed; try again once an admin has fixed it.`;
}

/** What the storage problem means, for the banner on staff pages and the admins' e-mail. */
export function storageProblemText(kind: StorageFailureKind): string {
  return `Liftline cannot save: ${WHY[kind]}. New readings are not acknowledged (gateways keep and resend them), and notes, acknowledgements and settings cannot be saved until it is fixed.`;
}
