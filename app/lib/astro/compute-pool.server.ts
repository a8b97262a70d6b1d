// A small pool of worker threads for the heavy science computations (long visibility runs, the
// epoch planner), so that one client's six-year plans cannot stall every other request.
//
// A worker runs compute-worker.ts: from a build, as the plain JavaScript that `npm run build`
// bundled beside the server (no tsx needed); from the sources (`npm run dev`, vitest), as
// TypeScript through tsx's loader (app/lib/worker-entry.server.ts). With SCIENCE_WORKERS=0, or
// with neither file there, the tasks run in the server itself, behind the same queue bound and
// budget. A worker that fails to start (say tsx missing beside the sources) is not replaced by
// the server's thread: its task fails, and the science API answers 503.
import { cpus } from "node:os";
import type { Worker } from "node:worker_threads";
import { findWorkerEntry, startWorker, type WorkerEntry } from "../worker-entry.server";
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

export class ComputePool {
  #slots: Slot[] = [];
  #queue: Job[] = [];
  #nextId = 1;
  #inProcess: boolean;
  #entry: WorkerEntry | null;

  /** `entry`: the worker's code, by default the bundle or the source as `findWorkerEntry` finds them. */
  constructor(readonly size: number, readonly queueBound: number, readonly timeoutMs: number, entry = findWorkerEntry("compute-worker")) {
    this.#entry = entry;
    this.#inProcess = size === 0 || !entry;
  }

  get usesWorkers() {
    return !this.#inProcess;
  }

  /** What the workers run: the bundled JavaScript, the TypeScript source, or nothing (in-process). */
  get workerKind(): WorkerEntry["kind"] | null {
    return this.#inProcess ? null : this.#entry!.kind;
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
    const worker = startWorker(this.#entry!, { env: process.env });
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
