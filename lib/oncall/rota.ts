// The on-call rota: shifts of a day or a week, each with a primary and an optional backup.

export interface Shift {
  id: string;
  startsAt: number;
  endsAt: number;
  primaryUserId: string;
  backupUserId: string | null;
}

/** The shift covering `atMs`; where shifts overlap, the one that started last wins (a swap). */
export function shiftAt(shifts: readonly Shift[], atMs: number): Shift | null {
  let found: Shift | null = null;
  for (const s of shifts) {
    if (s.startsAt <= atMs && atMs < s.endsAt && (!found || s.startsAt > found.startsAt)) found = s;
  }
  return found;
}

export const DAY_MS = 24 * 3600 * 1000;
