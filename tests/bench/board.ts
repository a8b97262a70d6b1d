// The ranking board for 300 proposals × 3 reviews on a real MariaDB (tests/bench/services.ts):
// the board's numbers (callBoard: grades, normalisation, every proposal's feasibility sheet,
// oversubscription) and the allocation page's data, cold (first read, sheets computed) and warm
// (median of repeated reads: the sheets come from their cache, the statements are counted).
import { benchServices } from "./services";

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const fmt = (ms: number) => (ms >= 1000 ? `${(ms / 1000).toFixed(2)} s` : `${ms.toFixed(1)} ms`);
const verdict = (ms: number, goal: number) => `${fmt(ms).padStart(9)}   goal ≤ ${fmt(goal)}  ${ms <= goal ? "met" : `MISSED by ${fmt(ms - goal)}`}`;

export async function runBoardBench(): Promise<string[]> {
  const services = await benchServices();
  const lines: string[] = [];
  try {
    const { Observation, Proposal, ReviewAssignment, Target, User } = await import("../../app/models/index.server");
    const { readyProposal, testCall } = await import("../integration/proposals-fixtures");
    const { callBoard } = await import("../../app/lib/allocation/board.server");
    const { boardUncertainty } = await import("../../app/lib/allocation/board-uncertainty");
    const { allocationSheet } = await import("../../app/lib/allocation/sheet.server");
    const { latestSemesterCheck, semesterCheckFacts, factsHash } = await import("../../app/lib/allocation/semester-check.server");

    const N = 300;
    const call = await testCall();
    const pi = await User.create({ email: `bench-board-${Date.now()}@bench.example`, name: "Bench PI", institution: "Bench Institute", lastSignInAt: null });
    const { proposal: first, target, option, filter } = await readyProposal({ user: pi, callId: call.id, title: "Bench board programme 1" });
    const template = (await Proposal.findByPk(first.id))!.get({ plain: true }) as Record<string, unknown>;
    const observation = (await Observation.findOne({ where: { proposalId: first.id } }))!.get({ plain: true }) as Record<string, unknown>;
    const strip = ({ id: _id, createdAt: _c, updatedAt: _u, ...rest }: Record<string, unknown>) => rest;
    const copies = await Proposal.bulkCreate(
      Array.from({ length: N - 1 }, (_, k) => ({ ...strip(template), title: `Bench board programme ${k + 2}`, serial: null, code: null }) as never),
    );
    const all = [first.id, ...copies.map((p) => p.id)];
    await Proposal.update({ status: "in_review", submittedAt: new Date() }, { where: { id: all } });
    for (const [i, id] of all.entries()) await Proposal.update({ serial: i + 1, code: `B${String(i + 1).padStart(3, "0")}-${call.semesterCode}` }, { where: { id } });
    // one invented field per copy, spread over the sky, with the first proposal's observation
    const targets = await Target.bulkCreate(
      copies.map((p, k) => ({ proposalId: p.id, name: `Bench Board Field ${k + 2}`, raDeg: (k * 137.508) % 360, decDeg: -20 + ((k * 53.7) % 80), pmRaMasPerYr: null, pmDecMasPerYr: null, magnitude: 16, band: "V", notes: "" })),
    );
    await Observation.bulkCreate(targets.map((t) => ({ ...strip(observation), proposalId: t.proposalId, targetId: t.id, instrumentId: option.instrumentId, filterId: filter.id }) as never));
    void target;
    const reviewers = await User.bulkCreate(Array.from({ length: 30 }, (_, r) => ({ email: `bench-reviewer-${r}-${Date.now()}@bench.example`, name: `Bench Reviewer ${r}`, institution: "Bench Institute", lastSignInAt: null })));
    await ReviewAssignment.bulkCreate(
      all.flatMap((proposalId, c) =>
        [0, 1, 2].map((j) => {
          const overall = 1 + ((c * 7 + j * 3) % 19) / 2; // 1 … 10 in half steps, invented
          return { callId: call.id, proposalId, reviewerId: reviewers[(c + j * 11) % 30].id, status: "submitted" as const, overall, science: overall, feasibility: overall, legacy: overall, submittedAt: new Date() };
        }),
      ),
    );

    let statements = 0;
    const counting = { logging: () => void statements++ };
    const orig = (services.sequelize as unknown as { options: { logging: unknown } }).options.logging;
    let t = performance.now();
    const board = await callBoard({ callId: call.id });
    lines.push(`board, ${N} proposals × 3 reviews, cold (every sheet computed)   ${fmt(performance.now() - t)}`);
    if (board.proposals.length !== N || board.proposals.some((p) => p.requestedError)) lines.push(`  (unexpected: ${board.proposals.length} rows)`);
    const times: number[] = [];
    for (let i = 0; i < 9; i++) {
      t = performance.now();
      await callBoard({ callId: call.id });
      times.push(performance.now() - t);
    }
    lines.push(`board, ${N} proposals × 3 reviews, warm median of 9    ${verdict(median(times), 50)}`);
    (services.sequelize as unknown as { options: { logging: unknown } }).options.logging = counting.logging;
    await callBoard({ callId: call.id });
    (services.sequelize as unknown as { options: { logging: unknown } }).options.logging = orig;
    lines.push(`board: SQL statements per read                           ${statements}`);
    // the rank bootstrap (2000 draws) and split-half reproducibility (1000 splits) on this board:
    // computed afresh (the inputs' cache bypassed) and as the board page reads it (cache by inputs)
    const fresh: number[] = [];
    for (let i = 0; i < 5; i++) {
      const b = await callBoard({ callId: call.id });
      t = performance.now();
      boardUncertainty(b, { fresh: true });
      fresh.push(performance.now() - t);
    }
    lines.push(`rank bootstrap + reproducibility alone, computed afresh, median of 5  ${fmt(median(fresh))}`);
    const withFresh: number[] = [];
    const withCache: number[] = [];
    for (let i = 0; i < 7; i++) {
      t = performance.now();
      boardUncertainty(await callBoard({ callId: call.id }), { fresh: true });
      withFresh.push(performance.now() - t);
      t = performance.now();
      boardUncertainty(await callBoard({ callId: call.id }));
      withCache.push(performance.now() - t);
    }
    lines.push(`board with rank uncertainty, uncertainty afresh, median of 7 ${verdict(median(withFresh), 300)}`);
    lines.push(`board with rank uncertainty, inputs unchanged (cached), median of 7 ${verdict(median(withCache), 300)}`);
    const sheetTimes: number[] = [];
    for (let i = 0; i < 5; i++) {
      t = performance.now();
      await allocationSheet({ callId: call.id, chair: reviewers[0] }); // the page as a chair on no team
      sheetTimes.push(performance.now() - t);
    }
    lines.push(`allocation page data, warm median of 5                   ${fmt(median(sheetTimes))}`);
    const factTimes: number[] = [];
    for (let i = 0; i < 5; i++) {
      t = performance.now();
      factsHash(await semesterCheckFacts({ callId: call.id }));
      factTimes.push(performance.now() - t);
    }
    lines.push(`semester-check staleness (facts + hash), warm median of 5 ${fmt(median(factTimes))}`);
    void latestSemesterCheck;
  } finally {
    await services.stop();
  }
  return lines;
}
