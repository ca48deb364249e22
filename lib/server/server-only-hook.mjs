// `import "server-only"` guards db/queries against client bundles; Next resolves it under the
// react-server condition. Plain Node (server.ts, the store worker) is a server too, so this
// resolve hook gives it the same empty module. Loaded with `--import` before tsx runs our code.
import { register } from "node:module";

const EMPTY = "data:text/javascript,export{}";

export async function resolve(specifier, context, nextResolve) {
  if (specifier === "server-only") return { url: EMPTY, format: "module", shortCircuit: true };
  return nextResolve(specifier, context);
}

if (!globalThis.__liftlineServerOnlyHook) {
  globalThis.__liftlineServerOnlyHook = true;
  register(import.meta.url);
}
