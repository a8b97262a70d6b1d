import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

// tests/run.ts makes one slot (database, mail catcher, payment fake, app port) per worker.
const workers = Number(process.env.TEST_WORKERS) || undefined;

// Own config, without the reactRouter() plugin, so that `~/` imports resolve in tests.
export default defineConfig({
  root: fileURLToPath(new URL("..", import.meta.url)),
  resolve: { tsconfigPaths: true },
  test: {
    testTimeout: 30_000,
    hookTimeout: 60_000,
    maxWorkers: workers,
    setupFiles: ["tests/helpers/worker-slot.ts"],
    projects: [
      {
        extends: true,
        test: {
          name: "parallel",
          include: ["app/**/*.test.ts", "fakes/**/*.test.ts", "tests/**/*.test.ts"],
          exclude: ["tests/integration/healthz.test.ts"],
        },
      },
      {
        // Freezes the one MariaDB server (SIGSTOP) that every worker's database lives on, so it
        // runs after the others, alone.
        extends: true,
        test: { name: "alone", include: ["tests/integration/healthz.test.ts"], fileParallelism: false },
      },
    ],
  },
});
