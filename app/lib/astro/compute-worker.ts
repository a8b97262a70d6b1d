// Entry of a science worker thread (started by compute-pool.server.ts: bundled by `npm run build`,
// through tsx from the sources; see app/lib/worker-entry.server.ts).
import { parentPort } from "node:worker_threads";
import { runScienceTask, type ScienceTask } from "./science-tasks";

parentPort?.on("message", (message: { id: number; task: ScienceTask }) => {
  try {
    parentPort?.postMessage({ id: message.id, ok: true, result: runScienceTask(message.task) });
  } catch (error) {
    parentPort?.postMessage({ id: message.id, ok: false, error: error instanceof Error ? error.message : String(error) });
  }
});
parentPort?.postMessage({ ready: true });
