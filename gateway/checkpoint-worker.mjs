// The background WAL checkpoint (gateway/checkpointer.ts): a PASSIVE checkpoint on a connection
// of its own every `everyMs`, until the first message. Plain JavaScript, so it needs no loader.
import { clearInterval, setInterval } from "node:timers";
import { parentPort, workerData } from "node:worker_threads";
import Database from "better-sqlite3";

const db = new Database(workerData.file, { fileMustExist: true });
db.pragma("busy_timeout = 1000");
const timer = setInterval(() => {
  try {
    db.pragma("wal_checkpoint(PASSIVE)");
  } catch {
    // Busy or closing: the next round retries.
  }
}, workerData.everyMs);
parentPort.once("message", () => {
  clearInterval(timer);
  db.close();
  parentPort.close();
});
