import { useFetcher } from "react-router";
import type { ActionFailure } from "~/lib/forms";
import { HELPFULNESS_MAX, HELPFULNESS_MIN } from "~/lib/review/vocabulary";

/** What the Decision tab's action answers; a failure names the comment in `rowId`. */
export type RateCommentResult = ActionFailure | { ok: true; intent: "rate"; assignmentId: number };

/** The team rates how helpful a reviewer's comment was (1–5; anonymous: nobody sees who rated). */
export function RateComment({ assignmentId, rating, label }: { assignmentId: number; rating: number | null; label: string }) {
  const fetcher = useFetcher<RateCommentResult>();
  const answer = fetcher.data && (fetcher.data.ok ? fetcher.data.assignmentId : fetcher.data.rowId) === assignmentId ? fetcher.data : undefined;
  const error = answer && !answer.ok ? (answer.errors.rating ?? answer.errors.assignmentId ?? answer.errors.form) : undefined;
  const shown = fetcher.formData ? Number(fetcher.formData.get("rating")) : rating;
  return (
    <fetcher.Form method="post" className="mt-2 flex flex-wrap items-center gap-2 text-sm" aria-label={`How helpful was ${label}?`}>
      <input type="hidden" name="intent" value="rate" />
      <input type="hidden" name="assignmentId" value={assignmentId} />
      <span className="text-slate-600">How helpful was this comment?</span>
      {Array.from({ length: HELPFULNESS_MAX - HELPFULNESS_MIN + 1 }, (_, i) => HELPFULNESS_MIN + i).map((n) => (
        <button
          key={n}
          type="submit"
          name="rating"
          value={n}
          aria-pressed={shown === n}
          className={`rounded border px-2 py-0.5 tabular-nums ${shown === n ? "border-night-700 bg-night-700 text-white" : "border-slate-300 bg-white"}`}
          title={n === HELPFULNESS_MIN ? "not helpful" : n === HELPFULNESS_MAX ? "very helpful" : undefined}
        >
          {n}
        </button>
      ))}
      <span className="text-xs text-slate-500">1 not helpful · 5 very helpful · anonymous</span>
      {answer?.ok ? <span role="status" className="text-emerald-700">Saved.</span> : null}
      {error ? <span role="alert" className="field-error">{error}</span> : null}
    </fetcher.Form>
  );
}
