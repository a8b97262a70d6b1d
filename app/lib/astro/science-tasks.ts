// The heavy computations of the science API as plain data in → plain data out, so that they can
// run in a worker thread (compute-worker.ts) or, without workers, in the server itself.
import { planEpochs, precisionForMovedEpochs, type PlanInput } from "./astrometry";
import { isoTime } from "./time";
import { altitudeCurve, computeVisibility, type VisibilityInput } from "./visibility";

export type ScienceTask =
  | { kind: "visibility"; input: VisibilityInput; night?: string }
  | { kind: "epochPlan"; input: PlanInput; moved?: { raDeg: number; decDeg: number; times: string[]; perEpochPrecisionMas: number } };

function curveJson(input: VisibilityInput, date: string) {
  const { night, points } = altitudeCurve(input.site, input.target, date, 10);
  const iso = (t: number | null) => (t === null ? null : isoTime(t));
  return { date, sunset: iso(night.sunset), sunrise: iso(night.sunrise), darkStart: iso(night.darkStart), darkEnd: iso(night.darkEnd), points };
}

export function runScienceTask(task: ScienceTask): unknown {
  if (task.kind === "visibility") {
    const result = computeVisibility(task.input);
    return task.night ? { ...result, curve: curveJson(task.input, task.night) } : result;
  }
  const plan = planEpochs(task.input);
  const moved = task.moved ? precisionForMovedEpochs(task.moved.raDeg, task.moved.decDeg, task.moved.times, task.moved.perEpochPrecisionMas) : undefined;
  return { plan, moved };
}
