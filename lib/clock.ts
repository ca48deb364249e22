/** Where time comes from, so tests and replays can run on a clock of their own. */
export interface Clock {
  now(): number;
}
export const systemClock: Clock = { now: () => Date.now() };
