// Entry of a semester check's worker thread (started by semester-check.server.ts, bundled or
// through tsx: worker-entry.server.ts): builds the check's input from the facts, runs it, posts
// progress and the result.
import { parentPort, workerData } from "node:worker_threads";
import { runSemesterCheck } from "./semester-check";
import { checkInputFromFacts, type CheckFacts } from "./semester-check-input";

const job = workerData as { facts: CheckFacts; realisations: number; seed: number };
try {
  const input = checkInputFromFacts(job.facts);
  parentPort?.postMessage({ progress: 0.1 });
  const result = runSemesterCheck(input, {
    realisations: job.realisations,
    seed: job.seed,
    onProgress: (done, total) => parentPort?.postMessage({ progress: 0.1 + (0.9 * done) / total }),
  });
  parentPort?.postMessage({ result });
} catch (error) {
  parentPort?.postMessage({ error: error instanceof Error ? error.message : String(error) });
}
