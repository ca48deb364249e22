import type Database from "better-sqlite3";

// The `ingest_state` table: a few numbers ingestion keeps across restarts (the rollup watermark,
// whether the last stop was clean). Statements prepared once per connection.

export type IngestStateKey = "rollups_sealed_before" | "closed_cleanly";

export interface IngestState {
  get(key: IngestStateKey): number | undefined;
  set(key: IngestStateKey, value: number): void;
  /** Sets the value only if it is larger than the stored one (a watermark never goes back). */
  raise(key: IngestStateKey, value: number): void;
}

export function ingestState(sqlite: Database.Database): IngestState {
  const read = sqlite.prepare("select value from ingest_state where key = ?").pluck();
  const write = sqlite.prepare(
    "insert into ingest_state (key, value) values (?, ?) on conflict (key) do update set value = excluded.value",
  );
  const raise = sqlite.prepare(
    "insert into ingest_state (key, value) values (?, ?) on conflict (key) do update set value = max(value, excluded.value)",
  );
  return {
    get: (key) => read.get(key) as number | undefined,
    set: (key, value) => void write.run(key, value),
    raise: (key, value) => void raise.run(key, value),
  };
}
