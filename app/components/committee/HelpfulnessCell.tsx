/** The mean helpfulness the teams gave this reviewer's comments, and how many ratings (never who gave them). */
export function HelpfulnessCell({ figures, reviewerId }: { figures?: { mean: number; ratings: number }; reviewerId: number }) {
  return (
    <span className="block text-xs font-normal text-slate-600" data-helpfulness={reviewerId} title="Mean helpfulness of the reviewer's comments, rated 1–5 by the teams that received them">
      {figures ? `helpful ${figures.mean.toFixed(1)}/5 (${figures.ratings} rating${figures.ratings === 1 ? "" : "s"})` : "no helpfulness ratings"}
    </span>
  );
}
