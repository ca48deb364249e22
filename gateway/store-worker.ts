import { parentPort, workerData } from "node:worker_threads";
import { openDb } from "@/db/client";
import { systemClock } from "@/lib/clock";
import { startPruner } from "./pruner";
import { createStore } from "./store";
import type { FromStore, StoreWorkerData, ToStore } from "./store-messages";

// The thread that owns ingestion's write connection: flushes arrive as columns, are committed
// here, and the answer (which rows were new) goes back to the event loop, which then sends the
// PUBACKs. Commits, page writes, rollup sealing and retention pruning run here so they do not
// hold up MQTT, sockets or pages.

const port = parentPort!;
const data = workerData as StoreWorkerData;
const send = (m: FromStore, transfer: ArrayBuffer[] = []) => port.postMessage(m, transfer);
const log = (line: string) => send({ type: "log", line });

const db = openDb(data.file);
const store = createStore(db.$client, {
  graceMs: data.graceMs,
  latestEveryMs: data.latestEveryMs,
  derivedRowsPerFlush: data.derivedRowsPerFlush,
  nowMs: data.nowMs,
  log,
});
// Retention deletes run here too, in slices between flushes, so they never wait on the lock.
const pruner =
  data.retention &&
  startPruner({
    db,
    clock: systemClock,
    rawRetentionMs: data.retention.rawMs,
    rollupRetentionMs: data.retention.rollupMs,
    log,
  });

port.on("message", (m: ToStore) => {
  switch (m.type) {
    case "flush":
      try {
        const done = store.write(m.flush);
        send({ type: "flushed", id: done.id, accepted: done.accepted, inserted: done.inserted, stats: store.stats() }, [
          done.accepted.buffer as ArrayBuffer,
          done.inserted.buffer as ArrayBuffer,
        ]);
      } catch (err) {
        const code = (err as { code?: unknown }).code;
        send({
          type: "flushFailed",
          id: m.flush.id,
          error: String(err),
          code: typeof code === "string" ? code : undefined,
        });
      }
      return;
    case "maintain":
      store.maintain(m.nowMs);
      return;
    case "forget":
      store.forget(m.pointIds);
      return;
    case "close":
      pruner?.stop();
      try {
        store.close(m.nowMs);
      } catch (err) {
        log(
          `[ingest] final write of rollups and latest values failed; they are rebuilt at the next start: ${String(err)}`,
        );
      }
      db.$client.close();
      send({ type: "closed" });
      port.close();
      return;
  }
});
