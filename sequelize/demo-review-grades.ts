// A demo review's state and grades from one invented merit: a submitted review has all four
// grades (science half a point above, legacy one below), a draft only its science grade. Shared by
// the panel and the distributed demo seeders.
const clamp = (x: number) => Math.min(10, Math.max(1, Math.round(x * 2) / 2));

export function demoReviewGrades({ submitted, draft, merit, now }: { submitted: boolean; draft: boolean; merit: number; now: Date }) {
  return {
    status: submitted ? ("submitted" as const) : draft ? ("draft" as const) : ("assigned" as const),
    science: submitted || draft ? clamp(merit + 0.5) : null,
    feasibility: submitted ? clamp(merit) : null,
    legacy: submitted ? clamp(merit - 1) : null,
    overall: submitted ? clamp(merit) : null,
    submittedAt: submitted ? now : null,
  };
}
