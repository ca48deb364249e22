// Entry of the store worker thread (gateway/store-worker.ts). A worker does not inherit the
// TypeScript loader reliably on Node 20, so it registers tsx itself before loading the module.
import { register } from "tsx/esm/api";
import "../lib/server/server-only-hook.mjs";

register();
await import("./store-worker.ts");
