import os from "node:os";
import { Worker } from "node:worker_threads";

// Password checks at MQTT CONNECT run on worker threads (gateway/credential-worker.mjs), so a
// reconnect storm costs the event loop a short message per check (two strings: ~2 µs to post,
// against ~15 µs with the salt and key as byte arrays). Bcrypt hashes from before scrypt
// (bcryptjs, cost 10: ~70 ms of JavaScript each) are checked there too, once per gateway,
// until they are replaced. node's async scrypt would run on libuv's pool, but it sets up each
// job on the calling thread, which measured ~0.4 ms a call on the event loop in a storm.

/** Threads stop after this long without work; they are started again on demand. */
const IDLE_MS = 30_000;

/**
 * Two threads, or one on a single core: a storm's checks (~1 ms each) are done in half the
 * time, and the event loop loses less to them than it would to a longer queue.
 */
export const CHECK_THREADS = Math.min(2, os.availableParallelism());

interface Thread {
  worker: Worker;
  pending: Map<number, (ok: boolean) => void>;
  idle?: NodeJS.Timeout;
}

const threads: Thread[] = [];
let nextId = 1;

function forget(thread: Thread) {
  const i = threads.indexOf(thread);
  if (i >= 0) threads.splice(i, 1);
}

function startThread(): Thread {
  const thread: Thread = {
    worker: new Worker(new URL("./credential-worker.mjs", import.meta.url)),
    pending: new Map(),
  };
  const { worker, pending } = thread;
  worker.unref();
  worker.on("message", (m: { id: number; ok: boolean }) => {
    pending.get(m.id)?.(m.ok);
    pending.delete(m.id);
    if (pending.size > 0) return;
    thread.idle = setTimeout(() => {
      forget(thread);
      void worker.terminate();
    }, IDLE_MS).unref();
  });
  const gone = () => {
    forget(thread);
    // Unanswered checks fail closed: the gateway is refused (CONNACK 4) and retries.
    for (const answer of pending.values()) answer(false);
    pending.clear();
  };
  worker.on("error", gone);
  worker.on("exit", gone);
  threads.push(thread);
  return thread;
}

/** The least busy thread, or a new one while there are fewer than CHECK_THREADS and all are busy. */
function pick(): Thread {
  let least: Thread | undefined;
  for (const t of threads) if (!least || t.pending.size < least.pending.size) least = t;
  if (least && (least.pending.size === 0 || threads.length >= CHECK_THREADS)) return least;
  return startThread();
}

/** Whether the password matches the stored hash (scrypt or bcrypt string), decided on a worker thread. */
export function checkOnWorker(password: string, hash: string): Promise<boolean> {
  const thread = pick();
  clearTimeout(thread.idle);
  const id = nextId++;
  return new Promise((resolve) => {
    thread.pending.set(id, resolve);
    thread.worker.postMessage({ id, password, hash });
  });
}
