import path from "node:path";
import { defineConfig } from "vitest/config";

export default defineConfig({
  resolve: { alias: { "@": path.resolve(import.meta.dirname) } },
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
