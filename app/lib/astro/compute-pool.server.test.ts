// The science worker pool: tasks run in a worker thread (TypeScript through tsx) and answer what
// the same task answers in-process; a full queue and an over-long task are refused, not waited on.
import { afterAll, describe, expect, it } from "vitest";
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
function pool(size: number, queue: number, timeoutMs: number) {
  const p = new ComputePool(size, queue, timeoutMs);
  pools.push(p);
  return p;
}
afterAll(() => pools.forEach((p) => p.close()));

describe("science worker pool", () => {
  it("runs a task in a worker thread with the in-process answer", async () => {
    const p = pool(1, 4, 60_000);
    expect(p.usesWorkers).toBe(true);
    const inWorker = await p.run(visibility(5));
    expect(inWorker).toEqual(runScienceTask(visibility(5)));
  }, 90_000);

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
