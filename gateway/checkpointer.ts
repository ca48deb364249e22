import { Worker } from "node:worker_threads";

// A PASSIVE checkpoint on its own connection in a worker thread copies committed WAL pages back
// into the database (and fsyncs) while the event loop goes on committing, so SQLite's automatic
// checkpoint, which runs inside a commit and blocks the event loop, is only a safety net
// (db/client.ts).

export function startCheckpointer(
  file: string,
  everyMs: number,
  log: (line: string) => void,
): { stop(): Promise<void> } {
  const worker = new Worker(new URL("./checkpoint-worker.mjs", import.meta.url), { workerData: { file, everyMs } });
  worker.unref();
  worker.on("error", (err) => log(`[ingest] background checkpoint stopped: ${String(err)}`));
  return {
    stop: () =>
      new Promise<void>((resolve) => {
        worker.once("exit", () => resolve());
        // Waited for now: keep the process up until it has closed its connection.
        worker.ref();
        worker.postMessage("stop");
        setTimeout(() => void worker.terminate(), 2000).unref();
      }),
  };
}
