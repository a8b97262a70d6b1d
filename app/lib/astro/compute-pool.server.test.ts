// The science worker pool: tasks run in a worker thread (the bundle `npm run build` makes, or
// from the sources the TypeScript through tsx) and answer what the same task answers in-process;
// a full queue and an over-long task are refused, not waited on.
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { afterAll, describe, expect, it } from "vitest";
import { bundleWorker } from "~/cli/node-bundles";
import type { WorkerEntry } from "../worker-entry.server";
import { ComputePool, PoolBusy, PoolTimeout } from "./compute-pool.server";
import { runScienceTask, type ScienceTask } from "./science-tasks";

const site = { latitudeDeg: 31.9, longitudeDeg: -111.6, elevationM: 2100, timeZone: "America/Phoenix" };
const visibility = (nights: number): ScienceTask => ({
  kind: "visibility",
  input: { site, target: { raDeg: 150, decDeg: 20 }, from: "2027-02-01", nights, limit: { minAltitudeDeg: 30 } },
});
const plan: ScienceTask = {
  kind: "epochPlan",
  input: { site, target: { raDeg: 150, decDeg: 20 }, firstDate: "2027-02-01", baselineYears: 6, epochs: 60, perEpochPrecisionMas: 2, limit: { minAltitudeDeg: 30 } },
};

const pools: ComputePool[] = [];
function pool(size: number, queue: number, timeoutMs: number, entry?: WorkerEntry | null) {
  const p = entry === undefined ? new ComputePool(size, queue, timeoutMs) : new ComputePool(size, queue, timeoutMs, entry);
  pools.push(p);
  return p;
}
const root = path.resolve(import.meta.dirname, "../../..");
const scratch: string[] = [];
afterAll(() => {
  pools.forEach((p) => p.close());
  for (const dir of scratch) rmSync(dir, { recursive: true, force: true });
});

describe("science worker pool", () => {
  it("runs a task in the worker the build bundles, where tsx cannot be imported", async () => {
    // Inside the repository (.data/, git-ignored) so that the bundle's package imports resolve;
    // a node_modules/tsx of its own there fails on import, as a missing tsx would.
    mkdirSync(path.join(root, ".data"), { recursive: true });
    const dir = mkdtempSync(path.join(root, ".data", "worker-bundle-"));
    scratch.push(dir);
    mkdirSync(path.join(dir, "node_modules/tsx"), { recursive: true });
    writeFileSync(path.join(dir, "node_modules/tsx/package.json"), JSON.stringify({ name: "tsx", type: "module", exports: { ".": "./gone.js", "./esm/api": "./gone.js" } }));
    writeFileSync(path.join(dir, "node_modules/tsx/gone.js"), `throw new Error("tsx is not installed here");\n`);
    mkdirSync(path.join(dir, "workers"));
    writeFileSync(path.join(dir, "workers/probe.mjs"), `import "tsx/esm/api";\n`);
    await expect(import(/* @vite-ignore */ pathToFileURL(path.join(dir, "workers/probe.mjs")).href)).rejects.toThrow("tsx is not installed here");

    const file = path.join(dir, "workers/compute-worker.mjs");
    await bundleWorker(path.join(root, "app"), "compute-worker", file);
    const p = pool(1, 4, 60_000, { kind: "bundle", file });
    expect(p.workerKind).toBe("bundle");
    expect(await p.run(visibility(5))).toEqual(runScienceTask(visibility(5)));
  }, 90_000);

  it("from the sources, runs a task through tsx in a worker thread with the in-process answer", async () => {
    const p = pool(1, 4, 60_000);
    expect(p.workerKind).toBe("source");
    const inWorker = await p.run(visibility(5));
    expect(inWorker).toEqual(runScienceTask(visibility(5)));
  }, 90_000);

  it("without a worker entry, runs the task in its own thread", async () => {
    const p = pool(1, 4, 60_000, null);
    expect(p.usesWorkers).toBe(false);
    expect(await p.run(visibility(3))).toEqual(runScienceTask(visibility(3)));
  });

  it("refuses a task beyond workers + queue with PoolBusy, without waiting", async () => {
    const p = pool(1, 1, 60_000);
    const first = p.run(plan);
    const second = p.run(plan);
    await expect(p.run(plan)).rejects.toBeInstanceOf(PoolBusy);
    await Promise.allSettled([first, second]);
  }, 120_000);

  it("stops a task over its time limit with PoolTimeout, and the next task still runs", async () => {
    const p = pool(1, 2, 50);
    await expect(p.run(plan)).rejects.toBeInstanceOf(PoolTimeout);
    const roomy = pool(1, 2, 60_000);
    expect(await roomy.run(visibility(2))).toEqual(runScienceTask(visibility(2)));
  }, 120_000);
});
