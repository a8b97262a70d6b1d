import { Form, Link, redirect, useActionData, useNavigation } from "react-router";
import { z } from "zod";
import { ProblemsList, TotalsTable } from "~/components/FeasibilityParts";
import { Field } from "~/components/Field";
import { GradeForm, type ReviewAnswer } from "~/components/review/GradeForm";
import { formAction, intent, orNotFound } from "~/lib/actions.server";
import { formatDec, formatRa } from "~/lib/astro/coordinates";
import { requireUser } from "~/lib/auth/auth.server";
import { memberRoleLabels, scienceCategoryLabel } from "~/lib/proposals/vocabulary";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { reviewBoard } from "~/lib/review/chair.server";
import { chairConflicts } from "~/lib/review/chair-conflicts.server";
import { declareConflict, reopenMyReview, reviewForProposal, saveGrade } from "~/lib/review/desk.server";
import { committeeAccess, committeeReading } from "~/lib/review/read.server";
import { CONFLICT_WITHHELD, reviewStatusLabels } from "~/lib/review/vocabulary";
import { conflictSchema, gradeSchema } from "~/lib/schemas/review";
import { fixed, formatUtc } from "~/lib/format";
import type { Route } from "./+types/review.$proposalId";
import { valueText } from "~/lib/forms";

export function meta({ data: d }: Route.MetaArgs) {
  return [{ title: `${d?.reading.proposal.code ?? "Proposal"} · Review · Nightshare` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const access = await orNotFound(committeeAccess({ user, proposalId }));
  const reading = await orNotFound(committeeReading(access));
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
    const { proposal: _proposal, call: _call, ...review } = await orNotFound(reviewForProposal({ user, proposalId }));
    return { ...base, as: "reviewer" as const, review, reviews: null, reviewsWithheld: null };
  }
  // the chair reads every review of the proposal, committee comments included
  // (none on a proposal this chair is conflicted on: `reviewsWithheld` says so)
  const board = await orNotFound(reviewBoard({ callId: access.call.id, viewer: user }));
  const reviews = board.assignments
    .filter((a) => a.proposalId === proposalId)
    .map((a) => ({ ...a, reviewer: board.panel.find((r) => r.reviewerId === a.reviewerId)?.name ?? `user ${a.reviewerId}` }));
  const reviewsWithheld = (await chairConflicts({ callId: access.call.id, chair: user })).has(proposalId) ? CONFLICT_WITHHELD : null;
  return { ...base, as: "chair" as const, review: null, reviews, reviewsWithheld };
}

/** The grade as a draft or as a submission: the button decides, never a field of the form. */
const gradeAs = (submit: boolean) => z.preprocess((v) => (typeof v === "object" && v !== null ? { ...v, submit } : v), gradeSchema);

const reviewIntents = z.discriminatedUnion("intent", [
  intent("draft", gradeAs(false)),
  intent("submit", gradeAs(true)),
  intent("reopen"),
  intent("conflict", conflictSchema),
]);

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const review = await orNotFound(reviewForProposal({ user, proposalId }));
  return formAction(request, reviewIntents, async (input) => {
    switch (input.intent) {
      case "conflict":
        await declareConflict({ user, assignmentId: review.assignmentId, reason: input.reason });
        return redirect("/review?conflict=1");
      case "reopen":
        await reopenMyReview({ user, assignmentId: review.assignmentId });
        return { ok: true as const, intent: input.intent, message: "Your review is a draft again; submit it before the deadline." };
      case "draft":
      case "submit": {
        const { intent: _intent, ...values } = input;
        const saved = await saveGrade({ user, assignmentId: review.assignmentId, values });
        return { ok: true as const, intent: input.intent, message: saved.status === "submitted" ? "Your review is submitted. You can reopen it until the deadline." : "Draft saved." };
      }
    }
  });
}

export default function ReviewProposal({ loaderData }: Route.ComponentProps) {
  const { reading, feasibility, review, reviews, reviewsWithheld, as } = loaderData;
  const actionData = useActionData<ReviewAnswer>();
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
                <input id="reason" name="reason" className="input" defaultValue={actionData && !actionData.ok && actionData.intent === "conflict" ? valueText(actionData.values, "reason") : ""} aria-invalid={conflictError ? true : undefined} />
              </Field>
              <button className="btn bg-red-700 hover:bg-red-800" name="intent" value="conflict" disabled={navigation.state !== "idle"}>Declare the conflict</button>
            </Form>
          </section>
        </>
      ) : null}

      {reviews ? (
        <section className="card space-y-2">
          <h2>Reviews</h2>
          {reviewsWithheld ? <p className="text-amber-900" data-testid="reviews-withheld">Reviews and reviewers {reviewsWithheld}.</p> : reviews.length === 0 ? <p>No reviewer is assigned yet.</p> : null}
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
