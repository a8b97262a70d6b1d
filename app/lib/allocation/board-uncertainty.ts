// The ranking board's uncertainty (issue 14 §1): the rank bootstrap and the split-half
// reproducibility on the board's own numbers — the reviewers' normalised grades, the hours each
// proposal requests in the call's semester and the hours offered there (less what earlier locked
// calls committed). It follows the computed ranking: the chair's moves are a judgement, not a
// draw. Results are kept by their inputs, so a board read again costs nothing here.
import { Lru } from "~/lib/lru";
import { bootstrapRanks, COIN_FLIP, inCoinFlipBand, splitHalfReproducibility, type AcceptRule, type RankedInput, type RankUncertainty, type Reproducibility } from "./rank-uncertainty";

type BoardLike = {
  call: { semesterCode: string };
  proposals: readonly {
    proposalId: number;
    zScores: readonly number[];
    requested: readonly { telescopeId: number; moonCategory: string; semesterCode: string; hours: number }[];
  }[];
  oversubscription: readonly { telescopeId: number; moonCategory: string; offeredHours: number }[];
};

export type BoardUncertainty = {
  rows: Map<number, RankUncertainty>;
  reproducibility: Reproducibility;
  /** proposals in the coin-flip band and the hours they request this semester, in all and per cell */
  coinFlip: { low: number; high: number; proposals: number; hours: number; cells: { telescopeId: number; moonCategory: string; hours: number }[] };
};

const cellKey = (telescopeId: number, moonCategory: string) => `${telescopeId}|${moonCategory}`;
const cache = new Lru<string, BoardUncertainty>(16);

/** `fresh` skips the cache (the bench measures the computation itself). */
export function boardUncertainty(board: BoardLike, { fresh = false }: { fresh?: boolean } = {}): BoardUncertainty {
  const ranked = board.proposals.filter((p) => p.zScores.length > 0);
  const inputs: RankedInput[] = ranked.map((p) => ({
    proposalId: p.proposalId,
    z: p.zScores,
    requested: p.requested.filter((r) => r.semesterCode === board.call.semesterCode && r.hours > 0).map((r) => ({ key: cellKey(r.telescopeId, r.moonCategory), hours: r.hours })),
  }));
  const rule: AcceptRule = { kind: "hours", offered: board.oversubscription.map((o) => ({ key: cellKey(o.telescopeId, o.moonCategory), hours: o.offeredHours })) };
  const key = JSON.stringify([inputs, rule]);
  const known = fresh ? undefined : cache.get(key);
  if (known) return known;

  const { rows } = bootstrapRanks(inputs, rule);
  const reproducibility = splitHalfReproducibility(inputs, rule);
  const byId = new Map(rows.map((r) => [r.proposalId, r]));
  const cells = new Map<string, { telescopeId: number; moonCategory: string; hours: number }>();
  let proposals = 0;
  let hours = 0;
  for (const p of ranked) {
    if (!inCoinFlipBand(byId.get(p.proposalId)!.probabilityAboveLine)) continue;
    proposals++;
    for (const r of p.requested) {
      if (r.semesterCode !== board.call.semesterCode || !(r.hours > 0)) continue;
      hours += r.hours;
      const k = cellKey(r.telescopeId, r.moonCategory);
      const cell = cells.get(k) ?? { telescopeId: r.telescopeId, moonCategory: r.moonCategory, hours: 0 };
      cell.hours += r.hours;
      cells.set(k, cell);
    }
  }
  const result = { rows: byId, reproducibility, coinFlip: { ...COIN_FLIP, proposals, hours, cells: [...cells.values()] } };
  cache.set(key, result);
  return result;
}
