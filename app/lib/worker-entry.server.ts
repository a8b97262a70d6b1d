// Where a worker thread's code comes from. `npm run build` bundles each entry below to plain
// JavaScript, <build>/server/workers/<name>.mjs (app/cli/node-bundles.ts), which node runs as it
// is: a deployment without dev dependencies (tsx is one) still has its workers. Running from the
// sources (`npm run dev`, vitest) there is no bundle beside this module, and the TypeScript entry
// runs through tsx's loader instead. With neither, callers compute in their own thread.
import { existsSync } from "node:fs";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { Worker, type WorkerOptions } from "node:worker_threads";

/** Each worker's TypeScript entry, from app/lib. */
export const WORKER_ENTRIES = {
  "compute-worker": "astro/compute-worker.ts",
  "semester-check-worker": "allocation/semester-check-worker.ts",
} as const;
export type WorkerName = keyof typeof WORKER_ENTRIES;

/** `bundle`: plain JavaScript that node runs; `source`: TypeScript, run through tsx. */
export type WorkerEntry = { kind: "bundle" | "source"; file: string };

const here = path.dirname(fileURLToPath(import.meta.url));

/**
 * From a build, the bundle (this module is then inside <build>/server/ or one folder below it,
 * as the bundler splits chunks); from the sources, the TypeScript entry; else null. Only what
 * sits beside this module counts, so a stale build/ never replaces the sources in development.
 */
export function findWorkerEntry(name: WorkerName): WorkerEntry | null {
  for (const dir of [here, path.dirname(here)]) {
    const file = path.join(dir, "workers", `${name}.mjs`);
    if (existsSync(file)) return { kind: "bundle", file };
  }
  const source = path.join(here, WORKER_ENTRIES[name]);
  return existsSync(source) ? { kind: "source", file: source } : null;
}

export function startWorker(entry: WorkerEntry, options: WorkerOptions = {}): Worker {
  if (entry.kind === "bundle") return new Worker(entry.file, options);
  // An eval'd CommonJS stub that registers tsx's ESM loader, then imports the TypeScript entry.
  const url = pathToFileURL(entry.file).href;
  return new Worker(`import("tsx/esm/api").then(({ register }) => { register(); return import(${JSON.stringify(url)}); })`, {
    ...options,
    eval: true,
  });
}
