// The reviewer suggestion as a minimum-cost flow, solved by successive shortest paths with
// Dijkstra on reduced costs (Johnson potentials; Edmonds & Karp 1972, Tomizawa 1971).
//
// Network: source → proposal (capacity k) → reviewer (capacity 1 per clean pair; cost 0 when the
// reviewer knows the proposal's category, 1 when not) → sink. The reviewer → sink arc has a convex
// cost in the reviewer's load: 0 per unit up to ⌊N/R⌋, then B·1, B·2, … for each unit beyond,
// where N = total reviews placed and B exceeds the sum of all category costs. Successive
// shortest paths give a maximum flow of minimum cost, so
//   1. every proposal gets min(k, its clean reviewers) reviewers (coverage comes first);
//   2. among those, loads are balanced: with a balanced assignment available, every other one
//      costs at least B more, so max − min ≤ 1 whenever that is possible at all;
//   3. among balanced ones, the most category matches.
// A convex arc keeps the reduced costs non-negative after each augmentation, so Dijkstra stays valid.
//
// Distributed review (`perReviewer` = k): the quota is on the reviewers' side. Each reviewer → sink
// arc has capacity min(k, the reviewer's clean proposals) at cost 0, so the maximum flow gives every
// reviewer as many of their k as the conflicts allow; the convex cost moves to the proposals' side
// (source → proposal: 0 per unit up to ⌊supply/P⌋, then B·1, B·2, … as unit arcs of capacity 1),
// so that among those flows the reviews are spread evenly over the proposals, then matched by category.
// Each submitting team owes k: a reviewer that n teams designated (`teams`) has the quota n·k.

export type SuggestProposal = { proposalId: number; category: string | null };
export type SuggestReviewer = {
  reviewerId: number;
  categories: readonly string[];
  /** distributed review: how many teams designated this reviewer (default 1); each owes `perReviewer` */
  teams?: number;
};
export type SuggestInput = {
  proposals: SuggestProposal[];
  reviewers: SuggestReviewer[];
  perProposal: number;
  /** distributed review: each reviewer gets this many proposals per team that designated them (fewer only where conflicts leave fewer) */
  perReviewer?: number;
  /** true for a pair that must never be assigned */
  isConflict: (proposalId: number, reviewerId: number) => boolean;
};
export type Suggestion = {
  assignments: { proposalId: number; reviewerId: number }[];
  loads: { reviewerId: number; count: number }[];
  impossible: { proposalId: number; reason: string }[];
  /** distributed review: reviewers who get fewer than `perReviewer`, and why */
  short: { reviewerId: number; count: number; reason: string }[];
  /** max − min load ≤ 1 over the panel */
  balanced: boolean;
  categoryMatches: number;
};

export const SUGGESTION_METHOD = "minimum-cost flow, successive shortest paths with Dijkstra on reduced costs (Johnson potentials)";

export function suggestAssignments({ proposals, reviewers, perProposal, perReviewer, isConflict }: SuggestInput): Suggestion {
  const P = proposals.length;
  const R = reviewers.length;
  const k = Math.max(0, Math.floor(perProposal));
  // clean reviewers per proposal
  const clean: number[][] = proposals.map((p) => {
    const list: number[] = [];
    for (let j = 0; j < R; j++) if (!isConflict(p.proposalId, reviewers[j].reviewerId)) list.push(j);
    return list;
  });
  const wanted = proposals.map((_, i) => Math.min(k, clean[i].length));
  const distributed = perReviewer !== undefined;
  // distributed: what each reviewer can take (their quota, or fewer clean proposals)
  const cleanPerReviewer = new Int32Array(R);
  for (const c of clean) for (const j of c) cleanPerReviewer[j]++;
  const wantedOf = reviewers.map((r) => Math.max(0, Math.floor(perReviewer ?? 0)) * Math.max(1, Math.floor(r.teams ?? 1)));
  const quota = Array.from({ length: R }, (_, j) => Math.min(wantedOf[j], cleanPerReviewer[j]));
  const supply = quota.reduce((a, b) => a + b, 0);
  const demand = wanted.reduce((a, b) => a + b, 0);
  const total = distributed ? Math.min(demand, supply) : demand;
  const floor = distributed ? (P > 0 ? Math.floor(supply / P) : 0) : R > 0 ? Math.floor(total / R) : 0;
  const B = total + 1;

  // nodes: 0 source, 1..P proposals, P+1..P+R reviewers, P+R+1 sink
  const S = 0;
  const T = P + R + 1;
  const V = T + 1;
  let pairs = 0;
  for (const c of clean) pairs += c.length;
  let sourceArcs = P;
  if (distributed) for (let i = 0; i < P; i++) sourceArcs += Math.max(0, wanted[i] - floor);
  const M = 2 * (sourceArcs + pairs + R);
  const head = new Int32Array(V).fill(-1);
  const to = new Int32Array(M);
  const cap = new Int32Array(M);
  const cost = new Float64Array(M);
  const next = new Int32Array(M);
  let m = 0;
  const addEdge = (u: number, v: number, c: number, w: number) => {
    to[m] = v, cap[m] = c, cost[m] = w, next[m] = head[u], (head[u] = m++);
    to[m] = u, cap[m] = 0, cost[m] = -w, next[m] = head[v], (head[v] = m++);
  };
  for (let i = 0; i < P; i++) {
    if (!distributed) addEdge(S, 1 + i, wanted[i], 0);
    else {
      addEdge(S, 1 + i, Math.min(floor, wanted[i]), 0);
      for (let u = 1; u <= wanted[i] - floor; u++) addEdge(S, 1 + i, 1, B * u);
    }
  }
  for (let i = 0; i < P; i++) {
    const cat = proposals[i].category;
    for (const j of clean[i]) addEdge(1 + i, P + 1 + j, 1, cat && reviewers[j].categories.includes(cat) ? 0 : 1);
  }
  // reviewer → sink: one arc whose cost follows the load (convex); kept current after each augmentation
  const load = new Int32Array(R);
  const sinkEdge = new Int32Array(R);
  // cost of the unit-th review (distributed: the quota is the arc's capacity, the balance is on the proposals)
  const marginal = (unit: number) => (distributed || unit <= floor ? 0 : B * (unit - floor));
  for (let j = 0; j < R; j++) {
    sinkEdge[j] = m;
    addEdge(P + 1 + j, T, distributed ? quota[j] : P, marginal(1));
  }
  const setLoad = (j: number, l: number) => {
    load[j] = l;
    cost[sinkEdge[j]] = marginal(l + 1);
    cost[sinkEdge[j] + 1] = -marginal(l);
  };

  const pot = new Float64Array(V);
  const dist = new Float64Array(V);
  const prevEdge = new Int32Array(V);
  const done = new Uint8Array(V);
  // binary heap of (distance, node) with lazy deletion
  let heapD = new Float64Array(1024);
  let heapN = new Int32Array(1024);
  let size = 0;
  const push = (d: number, n: number) => {
    if (size === heapD.length) {
      const d2 = new Float64Array(size * 2); d2.set(heapD); heapD = d2;
      const n2 = new Int32Array(size * 2); n2.set(heapN); heapN = n2;
    }
    let i = size++;
    while (i > 0) {
      const p = (i - 1) >> 1;
      if (heapD[p] <= d) break;
      heapD[i] = heapD[p], heapN[i] = heapN[p], (i = p);
    }
    heapD[i] = d, heapN[i] = n;
  };
  const pop = () => {
    const n = heapN[0];
    const d = heapD[--size];
    const last = heapN[size];
    let i = 0;
    for (;;) {
      let c = 2 * i + 1;
      if (c >= size) break;
      if (c + 1 < size && heapD[c + 1] < heapD[c]) c++;
      if (heapD[c] >= d) break;
      heapD[i] = heapD[c], heapN[i] = heapN[c], (i = c);
    }
    heapD[i] = d, heapN[i] = last;
    return n;
  };
  let flow = 0;
  while (flow < total) {
    dist.fill(Infinity);
    done.fill(0);
    dist[S] = 0;
    size = 0;
    push(0, S);
    while (size > 0) {
      const u = pop();
      if (done[u]) continue;
      done[u] = 1;
      if (u === T) break;
      const du = dist[u] + pot[u];
      for (let e = head[u]; e !== -1; e = next[e]) {
        if (cap[e] <= 0) continue;
        const v = to[e];
        if (done[v]) continue;
        const nd = du + cost[e] - pot[v];
        if (nd < dist[v] - 1e-9) {
          dist[v] = nd;
          prevEdge[v] = e;
          push(nd, v);
        }
      }
    }
    if (!done[T]) break;
    // stopped at the sink: nodes not settled move as far as the sink did (keeps reduced costs ≥ 0)
    const dT = dist[T];
    for (let v = 0; v < V; v++) pot[v] += done[v] ? dist[v] : dT;
    // augment one unit (proposal → reviewer arcs carry one)
    for (let v = T; v !== S; ) {
      const e = prevEdge[v];
      cap[e] -= 1;
      cap[e ^ 1] += 1;
      const u = to[e ^ 1];
      if (v === T) setLoad(u - P - 1, load[u - P - 1] + 1);
      else if (u === T) setLoad(v - P - 1, load[v - P - 1] - 1);
      v = u;
    }
    flow++;
  }

  const assignments: Suggestion["assignments"] = [];
  let categoryMatches = 0;
  const got = new Int32Array(P);
  for (let i = 0; i < P; i++) {
    for (let e = head[1 + i]; e !== -1; e = next[e]) {
      const v = to[e];
      if (v > P && v <= P + R && (e & 1) === 0 && cap[e] === 0) {
        const j = v - P - 1;
        assignments.push({ proposalId: proposals[i].proposalId, reviewerId: reviewers[j].reviewerId });
        got[i]++;
        const cat = proposals[i].category;
        if (cat && reviewers[j].categories.includes(cat)) categoryMatches++;
      }
    }
  }
  const impossible: Suggestion["impossible"] = [];
  for (let i = 0; i < P; i++) {
    if (distributed) {
      if (got[i] === 0) impossible.push({ proposalId: proposals[i].proposalId, reason: clean[i].length === 0 ? "every designated reviewer has a conflict with it" : "no designated reviewer had room for it" });
      continue;
    }
    if (got[i] < k) {
      const n = clean[i].length;
      impossible.push({
        proposalId: proposals[i].proposalId,
        reason: n === 0 ? `every reviewer on the panel has a conflict with it (${k} needed)` : `only ${n} of the panel's ${R} reviewers ${n === 1 ? "is" : "are"} free of conflicts with it (${k} needed)`,
      });
    }
  }
  const loads = reviewers.map((r, j) => ({ reviewerId: r.reviewerId, count: load[j] }));
  const short: Suggestion["short"] = !distributed
    ? []
    : reviewers.flatMap((r, j) => {
        const wanted = wantedOf[j];
        const forTeams = (r.teams ?? 1) > 1 ? `, ${Math.floor(perReviewer ?? 0)} for each of ${Math.floor(r.teams ?? 1)} teams` : "";
        return load[j] >= wanted
          ? []
          : [{
              reviewerId: r.reviewerId,
              count: load[j],
              reason:
                cleanPerReviewer[j] < wanted
                  ? `only ${cleanPerReviewer[j]} proposal${cleanPerReviewer[j] === 1 ? " of the call is" : "s of the call are"} free of conflicts with this reviewer (${wanted} wanted${forTeams})`
                  : `the call's other reviewers took the proposals this reviewer could have had (${wanted} wanted${forTeams})`,
            }];
      });
  const counts = loads.map((l) => l.count);
  const balanced = counts.length === 0 || Math.max(...counts) - Math.min(...counts) <= 1;
  return { assignments, loads, impossible, short, balanced, categoryMatches };
}
