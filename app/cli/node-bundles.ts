// The TypeScript entries that node starts itself, bundled to plain JavaScript at the end of
// `react-router build` (react-router.config.ts's buildEnd) with esbuild (a dev dependency, needed
// at build time only; packages stay imports), so that the production entry and the worker threads
// run without tsx:
//   <build>/cli/serve.mjs               app/cli/serve.ts (`npm run serve`, through serve-build.mjs).
//                                       Two folders below the repository like app/cli, so that its
//                                       `import.meta.dirname` paths still hold for build/.
//   <build>/server/workers/<name>.mjs   the worker entries of app/lib/worker-entry.server.ts
import path from "node:path";
import { WORKER_ENTRIES, type WorkerName } from "../lib/worker-entry.server";

const common = { bundle: true, packages: "external", platform: "node", format: "esm", target: "node20", logLevel: "warning" } as const;

/** One TypeScript entry to one plain-JavaScript file (also `npm start`'s front, start.ts). */
export async function bundle(entry: string, outfile: string) {
  const { build } = await import("esbuild");
  await build({ ...common, entryPoints: [entry], outfile });
}

/** One worker entry (`appDirectory`: the app/ folder) to `outfile`. */
export function bundleWorker(appDirectory: string, name: WorkerName, outfile: string) {
  return bundle(path.join(appDirectory, "lib", WORKER_ENTRIES[name]), outfile);
}

export async function bundleNodeEntries({ appDirectory, buildDirectory }: { appDirectory: string; buildDirectory: string }) {
  const names = Object.keys(WORKER_ENTRIES) as WorkerName[];
  await Promise.all([
    bundle(path.join(appDirectory, "cli/serve.ts"), path.join(buildDirectory, "cli/serve.mjs")),
    ...names.map((name) => bundleWorker(appDirectory, name, path.join(buildDirectory, "server/workers", `${name}.mjs`))),
  ]);
}
