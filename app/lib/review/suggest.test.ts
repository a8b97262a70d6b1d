// Property tests of the suggestion: random panels from many seeds, checked against facts computed
// here independently (clean reviewer counts; for small panels an exhaustive search of every
// assignment, which says whether a complete, balanced one exists and how many category matches
// the best of them has).
import { describe, expect, it } from "vitest";
import { suggestAssignments, type SuggestProposal, type SuggestReviewer } from "./suggest";

function mulberry32(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

const CATS = ["a", "b", "c"];

function randomPanel(seed: number, maxP: number, maxR: number, conflictRate: number) {
  const rnd = mulberry32(seed);
  const P = 1 + Math.floor(rnd() * maxP);
  const R = 1 + Math.floor(rnd() * maxR);
  const k = 1 + Math.floor(rnd() * 3);
  const proposals: SuggestProposal[] = Array.from({ length: P }, (_, i) => ({ proposalId: 100 + i, category: CATS[Math.floor(rnd() * CATS.length)] }));
  const reviewers: SuggestReviewer[] = Array.from({ length: R }, (_, j) => ({ reviewerId: 500 + j, categories: CATS.filter(() => rnd() < 0.4) }));
  const conflicts = new Set<string>();
  for (const p of proposals) for (const r of reviewers) if (rnd() < conflictRate) conflicts.add(`${p.proposalId}:${r.reviewerId}`);
  return { proposals, reviewers, k, conflicts, isConflict: (p: number, r: number) => conflicts.has(`${p}:${r}`) };
}

function combinations(items: number[], k: number): number[][] {
  if (k === 0) return [[]];
  if (items.length < k) return [];
  const [first, ...rest] = items;
  return [...combinations(rest, k - 1).map((c) => [first, ...c]), ...combinations(rest, k)];
}

/** Exhaustive: the most category matches over complete (k each), conflict-free, balanced assignments; null if none exists. */
function bestBalanced(panel: ReturnType<typeof randomPanel>): number | null {
  const { proposals, reviewers, k, isConflict } = panel;
  const options = proposals.map((p) => combinations(reviewers.map((_, j) => j).filter((j) => !isConflict(p.proposalId, reviewers[j].reviewerId)), k));
  if (options.some((o) => o.length === 0)) return null;
  const load = new Array(reviewers.length).fill(0);
  let best: number | null = null;
  const walk = (i: number, matches: number) => {
    if (i === proposals.length) {
      if (Math.max(...load) - Math.min(...load) <= 1) best = Math.max(best ?? -1, matches);
      return;
    }
    for (const combo of options[i]) {
      let m = 0;
      for (const j of combo) {
        load[j]++;
        if (reviewers[j].categories.includes(proposals[i].category!)) m++;
      }
      walk(i + 1, matches + m);
      for (const j of combo) load[j]--;
    }
  };
  walk(0, 0);
  return best;
}

function checkInvariants(panel: ReturnType<typeof randomPanel>, result: ReturnType<typeof suggestAssignments>) {
  const { proposals, reviewers, k, isConflict } = panel;
  // never a conflict, never the same pair twice
  for (const a of result.assignments) expect(isConflict(a.proposalId, a.reviewerId)).toBe(false);
  expect(new Set(result.assignments.map((a) => `${a.proposalId}:${a.reviewerId}`)).size).toBe(result.assignments.length);
  // every proposal gets min(k, clean reviewers); the ones short of k are listed with a reason
  for (const p of proposals) {
    const cleanCount = reviewers.filter((r) => !isConflict(p.proposalId, r.reviewerId)).length;
    const got = result.assignments.filter((a) => a.proposalId === p.proposalId).length;
    expect(got).toBe(Math.min(k, cleanCount));
    const listed = result.impossible.find((x) => x.proposalId === p.proposalId);
    if (cleanCount >= k) expect(listed).toBeUndefined();
    else expect(listed?.reason).toMatch(new RegExp(`${cleanCount === 0 ? "every reviewer" : `only ${cleanCount} of`}`));
  }
  // the loads it reports are the loads of its assignments
  for (const l of result.loads) expect(l.count).toBe(result.assignments.filter((a) => a.reviewerId === l.reviewerId).length);
}

describe("suggestion (min-cost flow)", () => {
  it("small random panels: complete and balanced exactly when an exhaustive search finds such an assignment, with as many category matches", () => {
    let feasibleSeen = 0;
    let infeasibleSeen = 0;
    for (let seed = 1; seed <= 400; seed++) {
      const panel = randomPanel(seed, 4, 4, 0.25);
      const result = suggestAssignments({ proposals: panel.proposals, reviewers: panel.reviewers, perProposal: panel.k, isConflict: panel.isConflict });
      checkInvariants(panel, result);
      const best = bestBalanced(panel);
      if (best === null) {
        infeasibleSeen++;
        expect(result.impossible.length > 0 || !result.balanced, `seed ${seed}`).toBe(true);
      } else {
        feasibleSeen++;
        expect(result.impossible, `seed ${seed}`).toEqual([]);
        const counts = result.loads.map((l) => l.count);
        expect(Math.max(...counts) - Math.min(...counts), `seed ${seed}`).toBeLessThanOrEqual(1);
        expect(result.categoryMatches, `seed ${seed}`).toBe(best);
      }
    }
    // the seeds cover both cases
    expect(feasibleSeen).toBeGreaterThan(50);
    expect(infeasibleSeen).toBeGreaterThan(20);
  });

  it("larger random panels: never a conflict, k per proposal when enough clean reviewers, loads within one when nobody is short", () => {
    for (let seed = 1000; seed < 1100; seed++) {
      const panel = randomPanel(seed, 40, 12, 0.15);
      const result = suggestAssignments({ proposals: panel.proposals, reviewers: panel.reviewers, perProposal: panel.k, isConflict: panel.isConflict });
      checkInvariants(panel, result);
    }
  });

  it("sparse conflicts on a panel of 10 for 30 proposals: always complete and within one", () => {
    for (let seed = 2000; seed < 2050; seed++) {
      const rnd = mulberry32(seed);
      const proposals = Array.from({ length: 30 }, (_, i) => ({ proposalId: i + 1, category: CATS[i % 3] }));
      const reviewers = Array.from({ length: 10 }, (_, j) => ({ reviewerId: 100 + j, categories: [CATS[j % 3]] }));
      const conflicts = new Set<string>();
      // each proposal conflicts with at most 2 reviewers: 8 stay clean
      for (const p of proposals) for (let n = 0; n < 2; n++) conflicts.add(`${p.proposalId}:${100 + Math.floor(rnd() * 10)}`);
      const result = suggestAssignments({ proposals, reviewers, perProposal: 3, isConflict: (p, r) => conflicts.has(`${p}:${r}`) });
      expect(result.impossible).toEqual([]);
      expect(result.assignments).toHaveLength(90);
      expect(result.assignments.every((a) => !conflicts.has(`${a.proposalId}:${a.reviewerId}`))).toBe(true);
      const counts = result.loads.map((l) => l.count);
      expect(Math.max(...counts) - Math.min(...counts)).toBeLessThanOrEqual(1);
      expect(result.balanced).toBe(true);
    }
  });

  it("a greedy pass would strand the last proposal; the flow does not", () => {
    // P1 can be reviewed by A or B, P2 only by A (B conflicted). Greedy in order gives P1 → A and strands P2.
    const result = suggestAssignments({
      proposals: [{ proposalId: 1, category: "x" }, { proposalId: 2, category: "y" }],
      reviewers: [{ reviewerId: 10, categories: ["x"] }, { reviewerId: 20, categories: [] }],
      perProposal: 1,
      isConflict: (p, r) => p === 2 && r === 20,
    });
    expect(result.assignments.sort((a, b) => a.proposalId - b.proposalId)).toEqual([{ proposalId: 1, reviewerId: 20 }, { proposalId: 2, reviewerId: 10 }]);
    expect(result.impossible).toEqual([]);
  });

  it("says which proposal is impossible and why", () => {
    const result = suggestAssignments({
      proposals: [{ proposalId: 7, category: null }],
      reviewers: [{ reviewerId: 1, categories: [] }, { reviewerId: 2, categories: [] }],
      perProposal: 3,
      isConflict: (_p, r) => r === 2,
    });
    expect(result.impossible).toEqual([{ proposalId: 7, reason: "only 1 of the panel's 2 reviewers is free of conflicts with it (3 needed)" }]);
    expect(result.assignments).toEqual([{ proposalId: 7, reviewerId: 1 }]);
  });
});

describe("distributed review: a quota per reviewer (perReviewer)", () => {
  it("ten teams, k = 8: everyone gets 8, never their own proposal, every proposal gets 8", () => {
    const proposals = Array.from({ length: 10 }, (_, i) => ({ proposalId: 100 + i, category: CATS[i % 3] }));
    const reviewers = Array.from({ length: 10 }, (_, j) => ({ reviewerId: 500 + j, categories: [CATS[j % 3]] }));
    const s = suggestAssignments({ proposals, reviewers, perProposal: 10, perReviewer: 8, isConflict: (p, r) => p - 100 === r - 500 });
    expect(s.loads.map((l) => l.count)).toEqual(Array(10).fill(8));
    expect(s.assignments.some((a) => a.proposalId - 100 === a.reviewerId - 500)).toBe(false);
    for (const p of proposals) expect(s.assignments.filter((a) => a.proposalId === p.proposalId).length).toBe(8);
    expect(s.short).toEqual([]);
  });

  it("a call too small for k: each gets what the conflicts leave, and the shortfall is said", () => {
    const proposals = Array.from({ length: 4 }, (_, i) => ({ proposalId: 100 + i, category: null }));
    const reviewers = Array.from({ length: 4 }, (_, j) => ({ reviewerId: 500 + j, categories: [] }));
    const s = suggestAssignments({ proposals, reviewers, perProposal: 4, perReviewer: 8, isConflict: (p, r) => p - 100 === r - 500 });
    expect(s.loads.map((l) => l.count)).toEqual([3, 3, 3, 3]);
    expect(s.short.map((x) => x.reason)).toEqual(Array(4).fill("only 3 proposals of the call are free of conflicts with this reviewer (8 wanted)"));
  });

  it("gives a reviewer two teams designated k for each team, and says so when conflicts leave fewer", () => {
    // six proposals; reviewer 500 is on the teams of 100 and 101 (both designated them), 502–505 on 102–105
    const proposals = Array.from({ length: 6 }, (_, i) => ({ proposalId: 100 + i, category: null }));
    const reviewers = [{ reviewerId: 500, categories: [], teams: 2 }, ...[2, 3, 4, 5].map((j) => ({ reviewerId: 500 + j, categories: [] }))];
    const own = (p: number, r: number) => (r === 500 ? p === 100 || p === 101 : p - 100 === r - 500);
    const s = suggestAssignments({ proposals, reviewers, perProposal: reviewers.length, perReviewer: 2, isConflict: own });
    expect(s.loads).toEqual([{ reviewerId: 500, count: 4 }, ...[502, 503, 504, 505].map((reviewerId) => ({ reviewerId, count: 2 }))]);
    expect(s.assignments.some((a) => own(a.proposalId, a.reviewerId))).toBe(false);
    expect(s.short).toEqual([]);
    // k = 3: 6 wanted of the shared reviewer, only 4 proposals free of conflicts
    const tight = suggestAssignments({ proposals, reviewers, perProposal: reviewers.length, perReviewer: 3, isConflict: own });
    expect(tight.loads[0]).toEqual({ reviewerId: 500, count: 4 });
    expect(tight.short).toEqual([{ reviewerId: 500, count: 4, reason: "only 4 proposals of the call are free of conflicts with this reviewer (6 wanted, 3 for each of 2 teams)" }]);
  });

  // Independent check by exhaustive search on small random calls: every reviewer's choice of at most
  // k clean proposals; among the choices placing the most reviews, the smallest possible largest
  // load of a proposal. The solver must place as many and reach that largest load.
  it("places the most reviews the quotas allow and spreads them with the smallest largest load (exhaustive, 300 seeds)", () => {
    for (let seed = 1; seed <= 300; seed++) {
      const { proposals, reviewers, conflicts, isConflict } = randomPanel(seed * 7919, 4, 4, 0.3);
      const k = 1 + (seed % 3);
      const s = suggestAssignments({ proposals, reviewers, perProposal: reviewers.length, perReviewer: k, isConflict });
      for (const a of s.assignments) expect(conflicts.has(`${a.proposalId}:${a.reviewerId}`)).toBe(false);
      for (const l of s.loads) expect(l.count).toBeLessThanOrEqual(k);
      const options = reviewers.map((r) => {
        const clean = proposals.map((p, i) => (isConflict(p.proposalId, r.reviewerId) ? -1 : i)).filter((i) => i >= 0);
        return combinations(clean, Math.min(k, clean.length));
      });
      let bestTotal = -1;
      let bestMax = Infinity;
      const loads = new Array(proposals.length).fill(0);
      const walk = (j: number, total: number) => {
        if (j === reviewers.length) {
          const max = Math.max(0, ...loads);
          if (total > bestTotal || (total === bestTotal && max < bestMax)) (bestTotal = total), (bestMax = max);
          return;
        }
        for (const c of options[j]) {
          for (const i of c) loads[i]++;
          walk(j + 1, total + c.length);
          for (const i of c) loads[i]--;
        }
      };
      walk(0, 0);
      expect(s.assignments.length, `seed ${seed}`).toBe(bestTotal);
      const got = proposals.map((p) => s.assignments.filter((a) => a.proposalId === p.proposalId).length);
      expect(Math.max(0, ...got), `seed ${seed}`).toBe(bestMax);
    }
  });
});
