// Reviewer suggestion benchmark: 300 proposals × 40 reviewers × k = 3 (goal ≤ 1 s), invented panel.
import { suggestAssignments } from "../../app/lib/review/suggest";

const CATS = ["stellar-populations", "clusters-astrometry", "stellar-physics", "galaxies", "exoplanets", "transients", "solar-system", "other"];

export function runReviewBench(): string[] {
  let s = 20261202;
  const rnd = () => ((s = (s * 16807) % 2147483647) / 2147483647);
  const proposals = Array.from({ length: 300 }, (_, i) => ({ proposalId: i + 1, category: CATS[i % CATS.length] }));
  const reviewers = Array.from({ length: 40 }, (_, j) => ({ reviewerId: 1000 + j, categories: CATS.filter(() => rnd() < 0.3) }));
  const conflicts = new Set<string>();
  for (const p of proposals) for (const r of reviewers) if (rnd() < 0.05) conflicts.add(`${p.proposalId}:${r.reviewerId}`);
  const lines: string[] = [];
  for (let run = 1; run <= 3; run++) {
    const t = performance.now();
    const result = suggestAssignments({ proposals, reviewers, perProposal: 3, isConflict: (p, r) => conflicts.has(`${p}:${r}`) });
    const ms = performance.now() - t;
    const counts = result.loads.map((l) => l.count);
    lines.push(
      `suggestion 300 proposals × 40 reviewers × k=3, 5 % conflicts (run ${run}): ${ms.toFixed(0)} ms — ${result.assignments.length} pairs, loads ${Math.min(...counts)}–${Math.max(...counts)}, ${result.categoryMatches} category matches, ${result.impossible.length} impossible (goal ≤ 1000 ms)`,
    );
  }
  return lines;
}
