// A small pool of worker threads for the heavy science computations (long visibility runs, the
// epoch planner), so that one client's six-year plans cannot stall every other request.
//
// Workers run the TypeScript source (app/lib/astro/compute-worker.ts) through tsx's loader:
// the server build bundles everything into build/server/index.js, so a worker needs its own
// entry, and tsx is what `npm start`, `npm run dev` and `npm test` already run with. Where the
// source or tsx is missing (SCIENCE_WORKERS=0, or a deployment without dev dependencies) the
// tasks run in the server itself, still behind the same queue bound and budget.
import { existsSync } from "node:fs";
import { cpus } from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import { runScienceTask, type ScienceTask } from "./science-tasks";

export class PoolBusy extends Error {
  constructor(readonly retryAfterSeconds: number) {
    super("The science workers are busy.");
  }
}
export class PoolTimeout extends Error {
  constructor(readonly retryAfterSeconds: number) {
    super("The computation took too long.");
  }
}

const intEnv = (name: string, fallback: number) => {
  const v = Number(process.env[name]);
  return Number.isInteger(v) && v >= 0 ? v : fallback;
};

export const POOL_SETTINGS = {
  workers: intEnv("SCIENCE_WORKERS", Math.max(1, Math.min(2, cpus().length - 1))),
  /** tasks waiting for a worker beyond those running; one more is a 503 */
  queue: intEnv("SCIENCE_QUEUE", 8),
  /** from submission to answer, queue wait included */
  timeoutMs: intEnv("SCIENCE_TASK_TIMEOUT_MS", 20_000),
};

type Job = { id: number; task: ScienceTask; resolve: (v: unknown) => void; reject: (e: Error) => void; timer: NodeJS.Timeout; slot?: Slot };
type Slot = { worker: Worker; job: Job | null; ready: Promise<void> };

const workerFile = path.resolve(process.cwd(), "app/lib/astro/compute-worker.ts");

function startWorker(): Worker {
  const url = pathToFileURL(workerFile).href;
  // An eval'd CommonJS stub that registers tsx's ESM loader, then imports the TypeScript entry.
  return new Worker(`import("tsx/esm/api").then(({ register }) => { register(); return import(${JSON.stringify(url)}); })`, {
    eval: true,
    env: process.env,
  });
}

export class ComputePool {
  #slots: Slot[] = [];
  #queue: Job[] = [];
  #nextId = 1;
  #inProcess: boolean;

  constructor(readonly size: number, readonly queueBound: number, readonly timeoutMs: number) {
    this.#inProcess = size === 0 || !existsSync(workerFile);
  }

  get usesWorkers() {
    return !this.#inProcess;
  }

  /** Tasks running or waiting. */
  get load() {
    if (this.#inProcess) return this.#waiting;
    return this.#queue.length + this.#slots.filter((s) => s.job).length;
  }

  run(task: ScienceTask): Promise<unknown> {
    const capacity = (this.#inProcess ? 1 : this.size) + this.queueBound;
    const retry = Math.max(1, Math.ceil(this.timeoutMs / 1000 / 4));
    if (this.load >= capacity) return Promise.reject(new PoolBusy(retry));
    if (this.#inProcess) return this.#runHere(task);
    return new Promise((resolve, reject) => {
      const job: Job = {
        id: this.#nextId++,
        task,
        resolve,
        reject,
        timer: setTimeout(() => this.#timeOut(job), this.timeoutMs),
      };
      this.#queue.push(job);
      this.#dispatch();
    });
  }

  // Without workers, one task at a time, the others wait their turn (bounded like the queue).
  #chain: Promise<unknown> = Promise.resolve();
  #waiting = 0;
  #runHere(task: ScienceTask) {
    this.#waiting++;
    const run = this.#chain.then(
      () => new Promise((resolve, reject) => setImmediate(() => {
        try {
          resolve(runScienceTask(task));
        } catch (error) {
          reject(error as Error);
        }
      })),
    );
    const done = run.finally(() => this.#waiting--);
    this.#chain = done.catch(() => undefined);
    return done;
  }

  #spawn(): Slot {
    const worker = startWorker();
    worker.unref();
    let ready!: () => void;
    const slot: Slot = { worker, job: null, ready: new Promise<void>((r) => (ready = r)) };
    worker.on("message", (m: { ready?: true; id?: number; ok?: boolean; result?: unknown; error?: string }) => {
      if (m.ready) return ready();
      const job = slot.job;
      if (!job || job.id !== m.id) return;
      clearTimeout(job.timer);
      slot.job = null;
      if (m.ok) job.resolve(m.result);
      else job.reject(new Error(m.error ?? "science task failed"));
      this.#dispatch();
    });
    worker.on("error", (error) => {
      console.error("science worker failed", error);
      this.#drop(slot, error instanceof Error ? error : new Error(String(error)));
    });
    worker.on("exit", () => this.#drop(slot, new Error("science worker exited")));
    this.#slots.push(slot);
    return slot;
  }

  #drop(slot: Slot, error: Error) {
    const i = this.#slots.indexOf(slot);
    if (i < 0) return;
    this.#slots.splice(i, 1);
    const job = slot.job;
    slot.job = null;
    if (job) {
      clearTimeout(job.timer);
      job.reject(error);
    }
    this.#dispatch();
  }

  #dispatch() {
    while (this.#queue.length > 0) {
      let slot = this.#slots.find((s) => !s.job);
      if (!slot && this.#slots.length < this.size) slot = this.#spawn();
      if (!slot) return;
      const job = this.#queue.shift()!;
      slot.job = job;
      job.slot = slot;
      const s = slot;
      slot.ready.then(() => {
        if (s.job === job) s.worker.postMessage({ id: job.id, task: job.task });
      });
    }
  }

  /** Ends the pool's threads (tests; the server's threads are unref'd and end with it). */
  close() {
    for (const slot of this.#slots.splice(0)) void slot.worker.terminate();
    for (const job of this.#queue.splice(0)) {
      clearTimeout(job.timer);
      job.reject(new Error("pool closed"));
    }
  }

  #timeOut(job: Job) {
    const queued = this.#queue.indexOf(job);
    if (queued >= 0) this.#queue.splice(queued, 1);
    const retry = Math.max(1, Math.ceil(this.timeoutMs / 1000));
    if (job.slot && job.slot.job === job) {
      // the worker is stuck on it: end that worker, a fresh one takes the next task
      const slot = job.slot;
      slot.job = null;
      const i = this.#slots.indexOf(slot);
      if (i >= 0) this.#slots.splice(i, 1);
      void slot.worker.terminate();
      this.#dispatch();
    }
    job.reject(new PoolTimeout(retry));
  }
}

let pool: ComputePool | null = null;

/** The process's pool (started lazily: no thread until the first heavy request). */
export function computePool(): ComputePool {
  pool ??= new ComputePool(POOL_SETTINGS.workers, POOL_SETTINGS.queue, POOL_SETTINGS.timeoutMs);
  return pool;
}
