// The semester check's jobs: the facts of a call's allocation from the database (board order,
// tiers, allocated hours, clear fractions, each programme's feasibility input), their sha256 as
// the check's `inputHash`, a `semester_checks` row per run, and the run itself in a worker thread
// (semester-check-worker.ts, bundled or through tsx like the science pool: worker-entry.server.ts)
// that reports progress.
// One check runs at a time per server process (the machine has two cores); the others wait
// queued. The check runs seconds, far past the science pool's 20-s budget for short tasks, and
// must not hold one of its two workers, so it has a thread of its own.
import { createHash } from "node:crypto";
import { Op } from "sequelize";
import stringify from "safe-stable-stringify";
import type { MoonCategory } from "~/lib/domain";
import { Refusal } from "~/lib/forms";
import { findWorkerEntry, startWorker } from "~/lib/worker-entry.server";
import { loadFeasibilityInputs } from "~/lib/proposals/feasibility.server";
import { callNotFound } from "~/lib/review/chair.server";
import type { ChairConflicts } from "~/lib/review/chair-conflicts.server";
import { Allocation, BoardEntry, Call, CallOffer, Proposal, ReviewAssignment, SemesterCheck, Telescope, TelescopeClearFraction } from "~/models/index.server";
import { BOARD_STATES, conflictedLast } from "./board.server";
import { boardOrder } from "./fill";
import { normaliseGrades } from "./normalise";
import { runSemesterCheck, type SemesterCheckResult } from "./semester-check";
import { checkInputFromFacts, type CheckFacts } from "./semester-check-input";

export type SemesterCheckView = {
  id: number;
  callId: number;
  status: "queued" | "running" | "done" | "failed";
  progress: number;
  seed: number;
  realisations: number;
  /** the call's inputs have changed since this run (only known once it has finished) */
  stale: boolean;
  createdAt: string;
  finishedAt: string | null;
  error: string | null;
  result: SemesterCheckResult | null;
};

/** The board's order of a call (chair positions over computed ranks), without the feasibility sheets. */
async function boardPositions(callId: number) {
  const proposals = await Proposal.findAll({ where: { callId, status: { [Op.in]: [...BOARD_STATES] } }, attributes: ["id", "code", "title"] });
  const ids = proposals.map((p) => p.id);
  const [grades, entries] = await Promise.all([
    ReviewAssignment.findAll({ where: { callId, status: "submitted", overall: { [Op.ne]: null }, proposalId: { [Op.in]: ids.length ? ids : [0] } }, attributes: ["proposalId", "reviewerId", "overall"] }),
    BoardEntry.findAll({ where: { callId } }),
  ]);
  const ranks = new Map(normaliseGrades(grades.map((g) => ({ proposalId: g.proposalId as number, reviewerId: g.reviewerId as number, overall: g.overall as number }))).proposals.map((p) => [p.proposalId, p.computedRank]));
  const entryOf = new Map(entries.map((e) => [e.proposalId as number, e]));
  const rows = proposals.map((p) => ({ proposalId: p.id, code: p.code, title: p.title, computedRank: ranks.get(p.id) ?? null, chairRank: entryOf.get(p.id)?.chairRank ?? null, tier: entryOf.get(p.id)?.tier ?? null }));
  return boardOrder(rows).map((r, i) => ({ ...r, position: i + 1 }));
}

/** Everything the check of a call depends on, as plain data (what `inputHash` covers). */
export async function semesterCheckFacts({ callId }: { callId: number }): Promise<CheckFacts> {
  const call = await Call.findByPk(callId, { include: [{ model: CallOffer, as: "offers" }] });
  if (!call) callNotFound();
  const offered = [...new Set((call.offers ?? []).filter((o) => o.hoursOffered > 0).map((o) => o.telescopeId as number))];
  const [order, allocations, telescopes, fractions] = await Promise.all([
    boardPositions(callId),
    Allocation.findAll({ where: { callId, semesterCode: call.semesterCode }, order: [["id", "ASC"]] }),
    Telescope.findAll({ where: { id: { [Op.in]: offered.length ? offered : [0] } }, order: [["id", "ASC"]] }),
    TelescopeClearFraction.findAll({ where: { telescopeId: { [Op.in]: offered.length ? offered : [0] } } }),
  ]);
  const tiered = order.filter((row) => row.tier);
  // every programme's feasibility input in six queries, whatever their number
  const inputs = await loadFeasibilityInputs({ proposalIds: tiered.map((row) => row.proposalId) });
  const programmes: CheckFacts["programmes"] = tiered.flatMap((row) => {
    const feasibility = inputs.get(row.proposalId);
    if (!feasibility) return [];
    const allocation = allocations
      .filter((a) => a.proposalId === row.proposalId && a.hours > 0)
      .map((a) => ({ telescopeId: a.telescopeId as number, moonCategory: a.moonCategory as MoonCategory, hours: a.hours }));
    return [{ proposalId: row.proposalId, code: row.code, title: row.title, tier: row.tier!, position: row.position, allocation, feasibility }];
  });
  return {
    call: { id: call.id, semesterCode: call.semesterCode, semesterStart: call.semesterStart, semesterEnd: call.semesterEnd },
    telescopes: telescopes.map((t) => ({
      id: t.id,
      name: t.name,
      site: { latitudeDeg: t.latitudeDeg, longitudeDeg: t.longitudeDeg, elevationM: t.elevationM, timeZone: t.timeZone },
      clearFractions: Array.from({ length: 12 }, (_, m) => fractions.find((f) => f.telescopeId === t.id && f.month === m + 1)?.clearFraction ?? null),
    })),
    programmes,
  };
}

/** sha256 of the facts as canonical JSON (keys sorted). */
export function factsHash(facts: CheckFacts): string {
  return createHash("sha256").update(stringify(facts)).digest("hex");
}

// ---------------------------------------------------------------------------------------------
// Jobs

const workerEntry = findWorkerEntry("semester-check-worker");
const pending: { id: number; facts: CheckFacts; callId: number }[] = [];
const active = new Set<number>();
let running = false;

type WorkerMessage = { progress?: number; result?: SemesterCheckResult; error?: string };

function runInWorker(job: { facts: CheckFacts; realisations: number; seed: number }, onProgress: (p: number) => void): Promise<SemesterCheckResult> {
  if (process.env.SCIENCE_WORKERS === "0" || !workerEntry) {
    // no worker available: the server's own thread, after the current request has been answered
    return new Promise((resolve, reject) =>
      setImmediate(() => {
        try {
          const input = checkInputFromFacts(job.facts);
          onProgress(0.1);
          resolve(runSemesterCheck(input, { realisations: job.realisations, seed: job.seed, onProgress: (d, t) => onProgress(0.1 + (0.9 * d) / t) }));
        } catch (error) {
          reject(error instanceof Error ? error : new Error(String(error)));
        }
      }),
    );
  }
  const worker = startWorker(workerEntry, { env: process.env, workerData: job });
  worker.unref();
  return new Promise((resolve, reject) => {
    let settled = false;
    const finish = (fn: () => void) => {
      if (settled) return;
      settled = true;
      fn();
      void worker.terminate();
    };
    worker.on("message", (m: WorkerMessage) => {
      if (m.progress !== undefined) onProgress(m.progress);
      if (m.result) finish(() => resolve(m.result!));
      if (m.error) finish(() => reject(new Error(m.error)));
    });
    worker.on("error", (error) => finish(() => reject(error instanceof Error ? error : new Error(String(error)))));
    worker.on("exit", (code) => finish(() => reject(new Error(`the check's worker stopped (exit ${code})`))));
  });
}

async function drain() {
  if (running) return;
  running = true;
  try {
    for (let job = pending.shift(); job; job = pending.shift()) {
      const row = await SemesterCheck.findByPk(job.id);
      if (!row) {
        active.delete(job.id);
        checkOfCall.delete(job.callId);
        continue;
      }
      await row.update({ status: "running", startedAt: new Date(), progress: 0 });
      let last = 0;
      let lastAt = 0;
      const onProgress = (p: number) => {
        const now = Date.now();
        // a write at most every 200 ms (the page polls every 500 ms)
        if (p < 1 && now - lastAt < 200) return;
        if (p <= last) return;
        last = p;
        lastAt = now;
        void SemesterCheck.update({ progress: Math.min(p, 0.999) }, { where: { id: job.id, status: "running" } }).catch(() => undefined);
      };
      try {
        const result = await runInWorker({ facts: job.facts, realisations: row.realisations, seed: row.seed }, onProgress);
        await row.update({ status: "done", progress: 1, result, finishedAt: new Date() });
      } catch (error) {
        console.error(`semester check ${job.id} failed`, error);
        await row.update({ status: "failed", error: String(error instanceof Error ? error.message : error).slice(0, 1000), finishedAt: new Date() });
      } finally {
        active.delete(job.id);
        checkOfCall.delete(job.callId);
      }
    }
  } finally {
    running = false;
  }
}

// The queue is bounded: one check per call queued or running (a burst of clicks, or a script,
// queues one), and at most MAX_CHECKS_WAITING over all calls, each holding its facts in memory
// and later seconds of a core. A call's slot is taken before the first await, so that requests
// arriving together cannot all pass the check.
export const MAX_CHECKS_WAITING = 4;
const checkOfCall = new Map<number, Promise<number | null>>();

function refuseCheck(status: 409 | 503, message: string, extra: Record<string, unknown> = {}, retryAfterSeconds?: number): never {
  throw new Refusal(message, { status, field: "callId", details: extra, retryAfterSeconds });
}

/** Queues a check of the call's allocation; it runs in a worker thread. 409 while one of the call's is waiting, 503 when the queue is full. */
export async function startSemesterCheck({ actor, callId, realisations, seed }: { actor: { id: number }; callId: number; realisations: number; seed: number }) {
  const waiting = checkOfCall.get(callId);
  if (waiting) {
    const id = await waiting;
    if (id !== null) refuseCheck(409, `A semester check of this call is already queued or running (check ${id}); wait for its result.`, { id });
    return startSemesterCheck({ actor, callId, realisations, seed }); // that one did not start
  }
  if (checkOfCall.size >= MAX_CHECKS_WAITING) refuseCheck(503, `${MAX_CHECKS_WAITING} semester checks are already waiting; try again in a minute.`, {}, 30);
  let settle: (id: number | null) => void = () => undefined;
  checkOfCall.set(callId, new Promise((resolve) => (settle = resolve)));
  try {
    const facts = await semesterCheckFacts({ callId });
    const row = await SemesterCheck.create({ callId, requestedById: actor.id, realisations, seed, inputHash: factsHash(facts), result: null, error: null, startedAt: null, finishedAt: null });
    active.add(row.id);
    pending.push({ id: row.id, facts, callId });
    settle(row.id);
    void drain();
    return { id: row.id };
  } catch (error) {
    checkOfCall.delete(callId);
    settle(null);
    throw error;
  }
}

async function view(row: SemesterCheck, currentHash: string | null): Promise<SemesterCheckView> {
  if ((row.status === "queued" || row.status === "running") && !active.has(row.id)) {
    // this process does not run it: the server stopped while it ran
    await row.update({ status: "failed", error: "The server restarted while this check ran; run it again.", finishedAt: new Date() });
  }
  const finished = row.status === "done" || row.status === "failed";
  const hash = finished ? (currentHash ?? factsHash(await semesterCheckFacts({ callId: row.callId as number }))) : null;
  return {
    id: row.id,
    callId: row.callId as number,
    status: row.status,
    progress: row.progress,
    seed: row.seed,
    realisations: row.realisations,
    stale: hash !== null && hash !== row.inputHash,
    createdAt: row.createdAt.toISOString(),
    finishedAt: row.finishedAt ? row.finishedAt.toISOString() : null,
    error: row.error,
    result: row.status === "done" ? (row.result as SemesterCheckResult) : null,
  };
}

/**
 * `check` as the chair with `conflicts` reads it: a programme they are conflicted on has no
 * position and comes last, by proposal id (its place on the board would tell its grades).
 */
export function withholdPositions(check: SemesterCheckView | null, conflicts: ChairConflicts): SemesterCheckView | null {
  if (!check?.result || conflicts.size === 0) return check;
  const programmes = conflictedLast(check.result.programmes, conflicts).map((p) => (conflicts.has(p.proposalId) ? { ...p, position: null } : p));
  return { ...check, result: { ...check.result, programmes } };
}

/** One check by id (the chair's; 404 when there is none). */
export async function semesterCheckById({ id }: { id: number }): Promise<SemesterCheckView | null> {
  const row = await SemesterCheck.findByPk(id);
  return row ? view(row, null) : null;
}

/** The call's latest check with `stale` against the current inputs, or null before the first. */
export async function latestSemesterCheck({ callId }: { callId: number }): Promise<SemesterCheckView | null> {
  const row = await SemesterCheck.findOne({ where: { callId }, order: [["createdAt", "DESC"], ["id", "DESC"]] });
  return row ? view(row, null) : null;
}
