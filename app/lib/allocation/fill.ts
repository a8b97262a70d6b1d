// Fill by rank: a first allocation the chair edits from. Down the ranked list, each proposal gets
// its requested hours and the first tier whose budget still holds all of its hours in the call's
// semester, per telescope × moon category:
//   assured — while assured hours stay within assuredShareLimit × offered;
//   queue   — while assured + queue hours stay within offered;
//   filler  — while all hours stay within offered × (1 + fillerMargin).
// A proposal that fits none gets no hours and no tier. Later semesters' hours follow the proposal
// (they become commitments on those semesters) and do not count against this semester's budget.
// What the chair set by hand (`kept`) is not refilled: its hours in this semester take their
// tier's share of the budgets first, and the ranked proposals are filled around them.
import type { AllocationTier, MoonCategory } from "~/lib/domain";

export type Cell = { telescopeId: number; moonCategory: MoonCategory; semesterCode: string; hours: number };
export type FillInput = {
  semesterCode: string;
  offered: { telescopeId: number; moonCategory: MoonCategory; hours: number }[];
  assuredShareLimit: number;
  fillerMargin: number;
  /** In rank order, best first. */
  ranked: { proposalId: number; requested: Cell[] }[];
  /** Proposals whose hours and tier the chair set by hand: left as they are, their hours counted. */
  kept?: { proposalId: number; tier: AllocationTier | null; allocated: Cell[] }[];
};
export type FillResult = { proposalId: number; tier: AllocationTier | null; rows: Cell[] }[];

const key = (c: { telescopeId: number; moonCategory: string }) => `${c.telescopeId}|${c.moonCategory}`;
const EPS = 1e-9;

export function fillByRank(input: FillInput): FillResult {
  const offered = new Map(input.offered.map((o) => [key(o), o.hours]));
  const used = { assured: new Map<string, number>(), all: new Map<string, number>() };
  const budgets: [AllocationTier, (k: string) => number, "assured" | "all"][] = [
    ["assured", (k) => (offered.get(k) ?? 0) * input.assuredShareLimit, "assured"],
    ["queue", (k) => offered.get(k) ?? 0, "all"],
    ["filler", (k) => (offered.get(k) ?? 0) * (1 + input.fillerMargin), "all"],
  ];
  const take = (tier: AllocationTier, k: string, h: number) => {
    used.all.set(k, (used.all.get(k) ?? 0) + h);
    if (tier === "assured") used.assured.set(k, (used.assured.get(k) ?? 0) + h);
  };
  for (const p of input.kept ?? []) {
    for (const c of p.allocated) if (p.tier && c.semesterCode === input.semesterCode && c.hours > 0) take(p.tier, key(c), c.hours);
  }
  const out: FillResult = [];
  for (const p of input.ranked) {
    const here = new Map<string, number>();
    for (const c of p.requested) if (c.semesterCode === input.semesterCode && c.hours > 0) here.set(key(c), (here.get(key(c)) ?? 0) + c.hours);
    const total = [...here.values()].reduce((s, h) => s + h, 0);
    let tier: AllocationTier | null = null;
    if (total > 0) {
      for (const [name, budget, pool] of budgets) {
        const fits = [...here].every(([k, h]) => offered.has(k) && (used[pool].get(k) ?? 0) + h <= budget(k) + EPS);
        // the queue and filler budgets count the assured hours too
        const fitsAll = name === "assured" ? [...here].every(([k, h]) => (used.all.get(k) ?? 0) + h <= (offered.get(k) ?? 0) + EPS) : true;
        if (fits && fitsAll) {
          tier = name;
          break;
        }
      }
    }
    if (tier) for (const [k, h] of here) take(tier, k, h);
    out.push({ proposalId: p.proposalId, tier, rows: tier ? p.requested.filter((c) => c.hours > 0) : [] });
  }
  return out;
}

/**
 * The board's order: the computed ranking, with each proposal the chair moved put at its chosen
 * position (1 = top; ties by computed rank; a position past the end puts it last).
 */
export function boardOrder<T extends { proposalId: number; computedRank: number | null; chairRank: number | null }>(rows: readonly T[]): T[] {
  const byComputed = (a: T, b: T) => (a.computedRank ?? Infinity) - (b.computedRank ?? Infinity) || a.proposalId - b.proposalId;
  const free = rows.filter((r) => r.chairRank === null).sort(byComputed);
  const moved = rows.filter((r) => r.chairRank !== null).sort((a, b) => a.chairRank! - b.chairRank! || byComputed(a, b));
  const out = [...free];
  for (const m of moved) out.splice(Math.min(m.chairRank! - 1, out.length), 0, m);
  return out;
}
