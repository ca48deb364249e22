// Rollup buckets: readings are rolled up per minute and per hour, each bucket named by the
// time (ms since epoch) it starts at.

export const MINUTE_MS = 60_000;
export const HOUR_MS = 3_600_000;

export const bucketOf = (ts: number) => Math.floor(ts / MINUTE_MS) * MINUTE_MS;
export const hourOf = (ts: number) => Math.floor(ts / HOUR_MS) * HOUR_MS;
