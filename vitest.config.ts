import path from "node:path";
import { defineConfig } from "vitest/config";

export default defineConfig({
  // Tests are a server: `import "server-only"` resolves to its empty module, as under Next.
  resolve: {
    alias: {
      "@": path.resolve(import.meta.dirname),
      "server-only": path.resolve(import.meta.dirname, "node_modules/server-only/empty.js"),
    },
  },
  test: {
    include: ["tests/**/*.test.ts"],
    environment: "node",
    testTimeout: 30_000,
    hookTimeout: 180_000,
    // Integration and browser tests each start a real server; keep them from starving 2 cores.
    fileParallelism: true,
    maxWorkers: 2,
  },
});
