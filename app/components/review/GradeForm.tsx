import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import { Form, useNavigation, useSubmit } from "react-router";
import { Field } from "~/components/Field";
import { valueText, type ActionFailure } from "~/lib/forms";
import { wordCount } from "~/lib/proposals/vocabulary";
import { meritCriteria, meritSteps, PI_COMMENT_MIN_WORDS, type ReviewStatus } from "~/lib/review/vocabulary";
import { gradeSchema, type GradeInput, type GradeValues } from "~/lib/schemas/review";

/** What the review page's action answers (a declared conflict is a redirect to the desk). */
export type ReviewAnswer = ActionFailure | { ok: true; intent: "draft" | "submit" | "reopen"; message: string };

/** The review as the form shows it. */
export type GradeFormReview = {
  status: ReviewStatus;
  open: boolean;
  grade: { science: number | null; feasibility: number | null; legacy: number | null; overall: number | null; commentToPi: string; commentToCommittee: string };
};

/** The reviewer's merits and comments: saved as a draft, submitted, or reopened. */
export function GradeForm({ review, actionData }: { review: GradeFormReview; actionData: ReviewAnswer | undefined }) {
  const navigation = useNavigation();
  const submit = useSubmit();
  const typed = actionData && !actionData.ok && (actionData.intent === "draft" || actionData.intent === "submit") ? actionData.values : null;
  const initial = (k: "science" | "feasibility" | "legacy" | "overall") => valueText(typed, k) ?? (review.grade[k] === null ? "" : String(review.grade[k]));
  const { register, handleSubmit, formState, watch, setValue } = useForm<GradeInput, unknown, GradeValues>({
    resolver: zodResolver(gradeSchema),
    defaultValues: {
      science: initial("science"),
      feasibility: initial("feasibility"),
      legacy: initial("legacy"),
      overall: initial("overall"),
      commentToPi: valueText(typed, "commentToPi") ?? review.grade.commentToPi,
      commentToCommittee: valueText(typed, "commentToCommittee") ?? review.grade.commentToCommittee,
      submit: false,
    },
  });
  const serverErrors = actionData && !actionData.ok && (actionData.intent === "draft" || actionData.intent === "submit") ? actionData.errors : {};
  const error = (f: string) => (formState.errors as Record<string, { message?: string } | undefined>)[f]?.message ?? serverErrors[f];
  const words = wordCount(watch("commentToPi") ?? "");
  const readOnly = !review.open || review.status === "submitted";
  const go = (intent: "draft" | "submit") =>
    handleSubmit((_values, e) => {
      const formEl = (e?.target as HTMLElement | undefined)?.closest("form") as HTMLFormElement;
      const fd = new FormData(formEl);
      fd.set("intent", intent);
      submit(fd, { method: "post" });
    });
  return (
    <Form method="post" noValidate className="space-y-4" aria-label="Your grade">
      {serverErrors.form ? <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-red-800">{serverErrors.form}</p> : null}
      <div className="grid gap-3 sm:grid-cols-4">
        {meritCriteria.map((c) => (
          <Field key={c.key} label={`${c.label} (1–10)`} id={c.key} error={error(c.key)}>
            <select id={c.key} className="input" disabled={readOnly} aria-invalid={error(c.key) ? true : undefined} aria-describedby={error(c.key) ? `${c.key}-error` : undefined} {...register(c.key)}>
              <option value="">—</option>
              {meritSteps.map((s) => <option key={s} value={String(s)}>{s}</option>)}
            </select>
          </Field>
        ))}
      </div>
      <Field label="Comment to the PI" id="commentToPi" error={error("commentToPi")} hint={`${words} words; at least ${PI_COMMENT_MIN_WORDS} to submit. The PI reads it in the decision letter, without your name.`}>
        <textarea id="commentToPi" rows={8} className="input" readOnly={readOnly} aria-invalid={error("commentToPi") ? true : undefined} {...register("commentToPi")} />
      </Field>
      <Field label="Comment to the committee (optional)" id="commentToCommittee" error={error("commentToCommittee")} hint="Only the chair and the committee read it; never the PI.">
        <textarea id="commentToCommittee" rows={4} className="input" readOnly={readOnly} {...register("commentToCommittee")} />
      </Field>
      <input type="hidden" {...register("submit")} onChange={() => setValue("submit", false)} />
      {review.open ? (
        review.status === "submitted" ? (
          <button className="btn" name="intent" value="reopen" disabled={navigation.state !== "idle"}>Reopen to change it</button>
        ) : (
          <div className="flex flex-wrap gap-3">
            <button type="button" className="btn-quiet" disabled={navigation.state !== "idle"} onClick={(e) => { setValue("submit", false); void go("draft")(e); }}>Save as draft</button>
            <button type="button" className="btn" disabled={navigation.state !== "idle"} onClick={(e) => { setValue("submit", true); void go("submit")(e); }}>Submit the review</button>
          </div>
        )
      ) : (
        <p className="text-slate-700">The review deadline has passed: only the chair can reopen this review.</p>
      )}
    </Form>
  );
}
