import { Link } from "react-router";
import { requireRole } from "~/lib/auth/auth.server";
import { reviewCalls } from "~/lib/review/chair.server";
import { formatUtc } from "~/lib/format";
import type { Route } from "./+types/committee._index";

export function meta() {
  return [{ title: "Committee · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  return { calls: await reviewCalls() };
}

export default function Committee({ loaderData }: Route.ComponentProps) {
  const { calls } = loaderData;
  return (
    <div className="space-y-4">
      <h1>Committee</h1>
      <p className="text-slate-700">Calls whose deadline has passed. Open one to put its proposals in review, choose the panel, assign reviewers and follow the reviews.</p>
      {calls.length === 0 ? (
        <p className="text-slate-600">No call has passed its deadline yet.</p>
      ) : (
        <ul className="space-y-2">
          {calls.map((c) => (
            <li key={c.id} className="card">
              <Link to={`/committee/${c.id}`} className="text-lg font-semibold">
                {c.semesterCode} · {c.title}
              </Link>
              <p className="text-sm text-slate-600">
                Deadline {formatUtc(c.deadlineAt)} · {c.inReview} in review · {c.submitted} submitted, not yet in review ·{" "}
                {c.committedAt ? `assignments committed, review deadline ${c.reviewDeadlineAt ? formatUtc(c.reviewDeadlineAt) : "not set"}` : c.startedAt ? "review started, assignments not committed" : "review not started"}
              </p>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
