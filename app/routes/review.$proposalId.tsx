import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import { data, Form, Link, redirect, useActionData, useNavigation, useSubmit } from "react-router";
import { ProblemsList, TotalsTable } from "~/components/FeasibilityParts";
import { Field } from "~/components/Field";
import { formatDec, formatRa } from "~/lib/astro/coordinates";
import { requireUser } from "~/lib/auth/auth.server";
import { fieldErrors, readForm } from "~/lib/forms";
import { memberRoleLabels, scienceCategoryLabel, wordCount } from "~/lib/proposals/vocabulary";
import { formValues, proposalIdParam, refusalResponse } from "~/lib/proposals/routes.server";
import { reviewBoard } from "~/lib/review/chair.server";
import { declareConflict, reopenMyReview, reviewForProposal, saveGrade } from "~/lib/review/desk.server";
import { committeeAccess, committeeReading } from "~/lib/review/read.server";
import { meritCriteria, meritSteps, PI_COMMENT_MIN_WORDS, reviewStatusLabels } from "~/lib/review/vocabulary";
import { conflictSchema, gradeSchema, type GradeInput } from "~/lib/schemas/review";
import { fixed, formatUtc } from "~/lib/format";
import type { Route } from "./+types/review.$proposalId";

export function meta({ data: d }: Route.MetaArgs) {
  return [{ title: `${d?.reading.proposal.code ?? "Proposal"} · Review · Nightshare` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const access = await committeeAccess({ user, proposalId });
  const reading = await committeeReading(access);
  const sheet = reading.feasibilitySheet;
  const feasibility = sheet
    ? {
        semesterCode: sheet.semesterCode,
        requestedHours: sheet.requestedHours,
        requestedHoursBySemester: sheet.requestedHoursBySemester,
        totals: sheet.totals,
        problems: sheet.problems,
        conventions: sheet.conventions,
        observations: sheet.observations.map((o) => ({
          observationId: o.observationId,
          targetName: o.targetName,
          telescopeName: o.telescopeName,
          instrumentName: o.instrumentName,
          band: o.band,
          moonCategory: o.moonCategory,
          maxAirmass: o.maxAirmass,
          usableHours: o.visibility.usableHours,
          exposureSeconds: o.exposure?.exposureSeconds ?? null,
          snr: o.exposure?.snr ?? null,
          saturated: o.exposure?.saturated ?? false,
          hours: o.requestedHoursThisSemester,
        })),
      }
    : null;
  const base = { reading: { ...reading, feasibilitySheet: null }, feasibility, now: new Date().toISOString() };
  if (access.as === "reviewer") {
    // the page gets the review, not the proposal and call records behind it (their ids name the PI's account)
    const { proposal: _proposal, call: _call, ...review } = await reviewForProposal({ user, proposalId });
    return { ...base, as: "reviewer" as const, review, reviews: null };
  }
  // the chair reads every review of the proposal, committee comments included
  const board = await reviewBoard({ callId: access.call.id });
  const reviews = board.assignments
    .filter((a) => a.proposalId === proposalId)
    .map((a) => ({ ...a, reviewer: board.panel.find((r) => r.reviewerId === a.reviewerId)?.name ?? `user ${a.reviewerId}` }));
  return { ...base, as: "chair" as const, review: null, reviews };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const { review } = await reviewForProposal({ user, proposalId }).then((r) => ({ review: r }));
  const form = await readForm(request);
  const intent = String(form.get("intent") ?? "");
  const values = formValues(form) as Record<string, string>;
  try {
    if (intent === "conflict") {
      const parsed = conflictSchema.safeParse(values);
      if (!parsed.success) return data({ ok: false as const, intent, errors: fieldErrors(parsed.error), values }, { status: 400 });
      await declareConflict({ user, assignmentId: review.assignmentId, reason: parsed.data.reason });
      throw redirect("/review?conflict=1");
    }
    if (intent === "reopen") {
      await reopenMyReview({ user, assignmentId: review.assignmentId });
      return { ok: true as const, intent, message: "Your review is a draft again; submit it before the deadline.", errors: {} as Record<string, string>, values };
    }
    const parsed = gradeSchema.safeParse({ ...values, submit: intent === "submit" });
    if (!parsed.success) return data({ ok: false as const, intent, errors: fieldErrors(parsed.error), values }, { status: 400 });
    const saved = await saveGrade({ user, assignmentId: review.assignmentId, values: parsed.data });
    return { ok: true as const, intent, message: saved.status === "submitted" ? "Your review is submitted. You can reopen it until the deadline." : "Draft saved.", errors: {} as Record<string, string>, values };
  } catch (error) {
    if (error instanceof Response) throw error;
    const refused = refusalResponse(error, values);
    return data({ ...refused.data, intent }, refused.init ?? undefined);
  }
}

function GradeForm({ review, actionData }: { review: NonNullable<Route.ComponentProps["loaderData"]["review"]>; actionData: ReturnType<typeof useActionData<typeof action>> }) {
  const navigation = useNavigation();
  const submit = useSubmit();
  const typed = actionData?.intent === "draft" || actionData?.intent === "submit" ? (actionData.values as Record<string, string>) : null;
  const initial = (k: "science" | "feasibility" | "legacy" | "overall") => typed?.[k] ?? (review.grade[k] === null ? "" : String(review.grade[k]));
  const { register, handleSubmit, formState, watch, setValue } = useForm<GradeInput>({
    resolver: zodResolver(gradeSchema),
    defaultValues: {
      science: initial("science"),
      feasibility: initial("feasibility"),
      legacy: initial("legacy"),
      overall: initial("overall"),
      commentToPi: typed?.commentToPi ?? review.grade.commentToPi,
      commentToCommittee: typed?.commentToCommittee ?? review.grade.commentToCommittee,
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

export default function ReviewProposal({ loaderData }: Route.ComponentProps) {
  const { reading, feasibility, review, reviews, as } = loaderData;
  const actionData = useActionData<typeof action>();
  const navigation = useNavigation();
  const p = reading.proposal;
  const conflictError = actionData && !actionData.ok && actionData.intent === "conflict" ? actionData.errors.reason : undefined;
  return (
    <div className="space-y-6">
      <p className="text-sm">{as === "reviewer" ? <Link to="/review">Review desk</Link> : <Link to={`/committee/${p.call.id}`}>Review of {p.call.semesterCode}</Link>} › {p.code}</p>
      <header>
        <h1>{p.code} · {p.title}</h1>
        <p className="text-slate-600">{scienceCategoryLabel(p.scienceCategory) ?? "No category"} · call {p.call.semesterCode}{p.isMultiSemester ? ` · semesters ${p.semestersRequested.join(", ")}` : ""}{p.isTargetOfOpportunity ? " · target of opportunity" : ""}</p>
        {review ? <p className="mt-1">Your status: <strong>{reviewStatusLabels[review.status]}</strong>{review.editableUntil ? ` · review deadline ${formatUtc(review.editableUntil)}` : ""}</p> : null}
      </header>
      {actionData?.ok ? <p role="status" className="rounded-md border border-emerald-300 bg-emerald-50 px-3 py-2 text-emerald-900">{actionData.message}</p> : null}

      <section className="card space-y-2">
        <h2>Summary</h2>
        <p className="whitespace-pre-wrap">{p.abstract || "No abstract."}</p>
        <h3 className="font-semibold">Team</h3>
        {p.teamHidden ? (
          <p className="text-sm text-slate-700" data-testid="team-hidden">
            {as === "reviewer" ? "Dual-anonymous review: the team's names and institutions are not shown. Judge the proposal on its content." : "Dual-anonymous review: the team is hidden until every grade is in and you reveal the teams on the call's review page."}
          </p>
        ) : (
          <ul className="text-sm">{p.team.map((m, i) => <li key={i}>{memberRoleLabels[m.role]}: {m.name ?? "(not signed in yet)"}, {m.institution ?? "no institution given"}</li>)}</ul>
        )}
      </section>

      <section className="card space-y-2">
        <h2>Targets and observations</h2>
        <table className="table-base text-sm">
          <thead><tr><th>Target</th><th>RA</th><th>Dec</th><th>Magnitude</th></tr></thead>
          <tbody>{p.targets.map((t) => <tr key={t.id}><td>{t.name}</td><td>{formatRa(t.raDeg)}</td><td>{formatDec(t.decDeg)}</td><td>{t.magnitude ?? "—"} {t.band ?? ""}</td></tr>)}</tbody>
        </table>
      </section>

      <section className="card space-y-3" aria-label="Feasibility sheet">
        <h2>Feasibility sheet</h2>
        {feasibility ? (
          <>
            <ProblemsList problems={feasibility.problems} />
            <table className="table-base text-sm">
              <thead><tr><th>Target</th><th>Instrument</th><th>Band</th><th>Moon</th><th>Airmass ≤</th><th>Usable h</th><th>Exposure s</th><th>SNR</th><th>Hours</th></tr></thead>
              <tbody>
                {feasibility.observations.map((o) => (
                  <tr key={o.observationId}>
                    <td>{o.targetName}</td><td>{o.telescopeName} · {o.instrumentName}</td><td>{o.band}</td><td>{o.moonCategory}</td><td>{o.maxAirmass}</td>
                    <td>{o.usableHours.toFixed(1)}</td><td>{fixed(o.exposureSeconds, (o.exposureSeconds ?? 0) < 10 ? 1 : 0)}</td><td>{fixed(o.snr, 0)}{o.saturated ? " (saturates)" : ""}</td><td>{o.hours.toFixed(1)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            <TotalsTable sheet={feasibility} />
            <p className="text-xs text-slate-500">{feasibility.conventions.airmassFormula}. {feasibility.conventions.exposure}.</p>
          </>
        ) : (
          <p className="text-red-800">{reading.feasibilityError ?? "No feasibility sheet."}</p>
        )}
      </section>

      <section className="card space-y-2" aria-label="Science case">
        <h2>Science case</h2>
        {reading.scienceCase ? (
          <>
            <p className="text-sm">{reading.scienceCase.filename}, {reading.scienceCase.pageCount} page{reading.scienceCase.pageCount === 1 ? "" : "s"} · <a href={`/review/${p.id}/files/${reading.scienceCase.id}`}>download</a> · <a href={`/review/${p.id}/pdf`}>the whole proposal as PDF</a></p>
            <iframe title="Science case" src={`/review/${p.id}/files/${reading.scienceCase.id}?inline=1`} className="h-[36rem] w-full rounded border border-slate-200" />
          </>
        ) : (
          <p>No science case was uploaded. <a href={`/review/${p.id}/pdf`}>The proposal as PDF</a></p>
        )}
      </section>

      {review ? (
        <>
          <section className="card space-y-3">
            <h2>Your grade</h2>
            <p className="text-sm text-slate-600">Merit 1–10 in half points, 10 best. Save a draft at any time; submit before the deadline; reopen and resubmit until then.</p>
            <GradeForm key={`${review.status}-${review.submittedAt}`} review={review} actionData={actionData} />
          </section>
          <section className="card space-y-2">
            <h2>Declare a conflict of interest</h2>
            <p className="text-sm text-slate-600">The assignment is released, the chair is told, and this proposal leaves your desk.</p>
            <Form method="post" className="space-y-2" noValidate>
              <Field label="Reason" id="reason" error={conflictError}>
                <input id="reason" name="reason" className="input" defaultValue={actionData?.intent === "conflict" ? (actionData.values as Record<string, string>).reason : ""} aria-invalid={conflictError ? true : undefined} />
              </Field>
              <button className="btn bg-red-700 hover:bg-red-800" name="intent" value="conflict" disabled={navigation.state !== "idle"}>Declare the conflict</button>
            </Form>
          </section>
        </>
      ) : null}

      {reviews ? (
        <section className="card space-y-2">
          <h2>Reviews</h2>
          {reviews.length === 0 ? <p>No reviewer is assigned yet.</p> : null}
          {reviews.map((r) => (
            <div key={r.assignmentId} className="border-t border-slate-200 pt-2">
              <p><strong>{r.reviewer}</strong> · {reviewStatusLabels[r.status]}{r.status === "submitted" ? ` · science ${r.science}, feasibility ${r.feasibility}, legacy ${r.legacy}, overall ${r.overall}` : ""}</p>
              {r.commentToPi ? <p className="whitespace-pre-wrap text-sm"><em>To the PI:</em> {r.commentToPi}</p> : null}
              {r.commentToCommittee ? <p className="whitespace-pre-wrap text-sm"><em>To the committee:</em> {r.commentToCommittee}</p> : null}
              {r.conflictReason ? <p className="text-sm text-red-800">Conflict declared: {r.conflictReason}</p> : null}
            </div>
          ))}
        </section>
      ) : null}
    </div>
  );
}
