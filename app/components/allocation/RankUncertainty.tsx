// The rank bootstrap on the ranking board: the 68 % interval bar beside a rank, and the card that
// says how reproducible the call's accepted list is and how many hours sit in the coin-flip band.
import type { BoardUncertainty } from "~/lib/allocation/board-uncertainty";
import { COIN_FLIP, DEFAULT_DRAWS } from "~/lib/allocation/rank-uncertainty";
import { percent } from "~/lib/format";


/** A bar over ranks 1…count: the 68 % interval, with a tick at the computed rank. */
export function RankIntervalBar({ rank, interval, count }: { rank: number; interval: { low: number; high: number }; count: number }) {
  const width = 96;
  const x = (r: number) => (count <= 1 ? width / 2 : 2 + ((r - 1) / (count - 1)) * (width - 4));
  return (
    <svg width={width} height={12} role="img" aria-label={`68 % of draws rank it between ${interval.low} and ${interval.high}`} className="inline-block align-middle">
      <line x1={2} x2={width - 2} y1={6} y2={6} className="stroke-slate-300" strokeWidth={1} />
      <rect x={x(interval.low) - 1.5} width={Math.max(3, x(interval.high) - x(interval.low) + 3)} y={3} height={6} rx={2} className="fill-night-700" opacity={0.55} />
      <line x1={x(rank)} x2={x(rank)} y1={1} y2={11} className="stroke-slate-900" strokeWidth={2} />
    </svg>
  );
}

export function ReproducibilityCard({ uncertainty, telescopeName }: { uncertainty: Omit<BoardUncertainty, "rows">; telescopeName: (id: number) => string }) {
  const { reproducibility: r, coinFlip } = uncertainty;
  return (
    <section className="card space-y-2" aria-labelledby="firmness">
      <h2 id="firmness">How firm is this ranking?</h2>
      {r.expectedAgreement === null ? (
        <p data-testid="reproducibility">Too few proposals have two or more grades to estimate how reproducible the accepted list is.</p>
      ) : (
        <p data-testid="reproducibility">
          Reproducibility <strong>{percent(r.expectedAgreement)}</strong> ± {percent(r.spread)}: if each proposal's reviewers were split into two random halves, the second half would accept on average {percent(r.expectedAgreement)} of the proposals the first half puts above the allocation line
          <span className="text-slate-600"> ({r.draws} splits, seed {r.seed}; {r.proposals} proposals{r.leftOut ? `; ${r.leftOut} with a single grade keep their place but are not counted` : ""})</span>.
        </p>
      )}
      <p className="text-sm text-slate-700">
        For comparison, two independent panels of six referees agreed on 55 ± 5 % of their top quartile in a study of about 15 000 proposals (Patat 2018, arXiv:1805.06981); chance alone gives 25 %.
        Half-panels are smaller than the whole panel, so the whole panel's list is somewhat firmer than this figure.
      </p>
      <p data-testid="coin-flip">
        <span className="mr-1 inline-block h-3 w-3 rounded-sm bg-amber-100 ring-1 ring-amber-300 align-middle" aria-hidden />
        Coin-flip band: <strong>{coinFlip.proposals}</strong> {coinFlip.proposals === 1 ? "proposal" : "proposals"} with <strong>{coinFlip.hours.toFixed(1)} h</strong> requested this semester lie above the line in between {Math.round(COIN_FLIP.low * 100)} % and {Math.round(COIN_FLIP.high * 100)} % of the draws
        {coinFlip.cells.length ? ` (${coinFlip.cells.map((c) => `${telescopeName(c.telescopeId)} ${c.moonCategory} ${c.hours.toFixed(1)} h`).join(", ")})` : ""}. Their rows are shaded.
      </p>
      <p className="text-sm text-slate-700">
        The rank interval is the 16th to 84th percentile of a proposal's rank over {DEFAULT_DRAWS} draws that resample each proposal's own normalised grades with replacement; "above line" is the share of draws in which, counting down that draw's ranking as fill by rank does, its requested hours still fit within what is left of the offered hours in every telescope × moon category it asks for (a request that does not fit takes nothing). The chair's moves are not drawn.
      </p>
    </section>
  );
}
