import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

// Own config, without the reactRouter() plugin, so that `~/` imports resolve in tests.
export default defineConfig({
  root: fileURLToPath(new URL("..", import.meta.url)),
  resolve: { tsconfigPaths: true },
  test: {
    include: ["app/**/*.test.ts", "fakes/**/*.test.ts", "tests/**/*.test.ts"],
    testTimeout: 30_000,
    hookTimeout: 60_000,
    fileParallelism: false,
  },
});
