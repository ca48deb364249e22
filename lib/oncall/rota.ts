// The on-call rota: shifts of a day or a week, each with a primary and an optional backup.

export interface Shift {
  id: string;
  startsAt: number;
  endsAt: number;
  primaryUserId: string;
  backupUserId: string | null;
}

/** The shift covering `atMs`; where shifts overlap, the one that started last wins (a swap). */
export function shiftAt<S extends Shift>(shifts: readonly S[], atMs: number): S | null {
  let found: S | null = null;
  for (const s of shifts) {
    if (s.startsAt <= atMs && atMs < s.endsAt && (!found || s.startsAt > found.startsAt)) found = s;
  }
  return found;
}

export const DAY_MS = 24 * 3600 * 1000;

/** Who is on call now and the next shift to start (for the phone's rota card). */
export function nowAndNext<S extends Shift>(shifts: readonly S[], atMs: number): { now: S | null; next: S | null } {
  const now = shiftAt(shifts, atMs);
  const next = [...shifts].filter((s) => s.startsAt > atMs).sort((a, b) => a.startsAt - b.startsAt)[0] ?? null;
  return { now, next };
}
