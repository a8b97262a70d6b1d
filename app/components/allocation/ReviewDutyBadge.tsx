// Distributed review on the ranking board: what the proposal's team delivered of the reviews it owes.
type Duty = { owed: number; delivered: number; late: boolean; teams: number } | null;

export function ReviewDutyBadge({ duty, withheld }: { duty: Duty; withheld: string | null }) {
  if (!duty) return <span className="text-slate-400">–</span>;
  const text = `${duty.delivered} of ${duty.owed}`;
  // one person designated by several teams owes (and delivers) for all of them
  const shared = duty.teams > 1 ? <span className="block text-xs text-slate-600">reviewer shared by {duty.teams} teams</span> : null;
  if (!duty.late) return <span data-testid="review-duty">{text}{duty.owed > 0 && duty.delivered === duty.owed ? " ✓" : ""}{shared}</span>;
  return (
    <span data-testid="review-duty" title={withheld ?? "The team's reviewer missed the review deadline"}>
      {text} <span className="rounded bg-red-100 px-1.5 py-0.5 text-xs font-semibold text-red-900">{withheld ? "late · not ranked" : "late"}</span>
      {shared}
    </span>
  );
}
