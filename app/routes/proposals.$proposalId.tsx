import { Link, NavLink, Outlet } from "react-router";
import { ReadinessStrip } from "~/components/proposals/ReadinessStrip";
import { StatusBadge } from "~/components/StatusBadge";
import { formatUtc as utc } from "~/lib/format";
import { orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { memberRoleLabels } from "~/lib/proposals/vocabulary";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { submissionChecklist } from "~/lib/proposals/submit.server";
import { getProposalForUser, workspaceHeader } from "~/lib/proposals/proposals.server";
import { Op } from "sequelize";
import { Charge, Observation } from "~/models/index.server";
import type { Route } from "./+types/proposals.$proposalId";

export function meta({ data }: Route.MetaArgs) {
  return [{ title: `${data?.proposal.code ?? "Draft"} · ${data?.proposal.title ?? "Proposal"} · Nightshare` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const access = await orNotFound(getProposalForUser({ proposalId, user }));
  // The checklist is for drafts only: a submitted or decided proposal shows its state instead.
  const readiness =
    access.proposal.status === "draft"
      ? await orNotFound(submissionChecklist({ user, proposalId, access })).then(({ items, ready, requestedHours, requestedHoursBySemester, selfReference }) => ({ items, ready, requestedHours, requestedHoursBySemester, selfReference }))
      : null;
  // Epoch progress is a tab once an astrometry programme is accepted (the route answers for any proposal)
  const epochTab = access.proposal.status === "accepted" && (await Observation.count({ where: { proposalId, baselineYears: { [Op.ne]: null } } })) > 0;
  // the Decision tab once the office has sent the letter
  const decisionTab = access.proposal.decisionSentAt !== null && access.proposal.decisionSentAt !== undefined;
  // the Charges tab appears once there can be charges: an accepted programme, or one that has some
  const showCharges = access.proposal.status === "accepted" || (await Charge.count({ where: { proposalId } })) > 0;
  return { proposal: workspaceHeader(access), readiness, submittedAt: access.proposal.submittedAt?.toISOString() ?? null, epochTab, decisionTab, showCharges };
}

const tabs = [
  { to: "", label: "Summary", end: true },
  { to: "targets", label: "Targets" },
  { to: "observations", label: "Observations" },
  { to: "feasibility", label: "Feasibility sheet" },
  { to: "science-case", label: "Science case" },
  { to: "team", label: "Team" },
  { to: "epochs", label: "Epoch progress" },
  { to: "change-log", label: "Change log" },
  { to: "decision", label: "Decision" },
];
const chargesTab = { to: "charges", label: "Charges", end: false };

export default function Workspace({ loaderData }: Route.ComponentProps) {
  const p = loaderData.proposal;
  return (
    <div className="space-y-5">
      <div>
        <p className="text-sm text-slate-600">
          <Link to="/proposals">My proposals</Link> · call {p.call.semesterCode}
        </p>
        <div className="mt-1 flex flex-wrap items-center gap-3">
          <h1 className="min-w-0 break-words">{p.title}</h1>
          <StatusBadge status={p.status} />
        </div>
        <p className="mt-1 text-sm text-slate-600">
          {p.code ? <span className="font-semibold text-night-900">{p.code}</span> : <span>No code yet: it is given when the proposal is sent</span>} · you are{" "}
          {memberRoleLabels[p.role]} · deadline {utc(p.call.deadlineAt)}
          {p.call.deadlinePassed ? <strong className="text-red-700"> (passed)</strong> : null}
        </p>
      </div>
      {!p.editable ? (
        <p role="status" className="rounded-md border border-night-700/30 bg-night-100 px-4 py-2 text-sm text-night-900">
          This proposal is {p.status === "in_review" ? "in review" : p.status} and therefore read-only.{" "}
          {p.status === "submitted" && !p.call.deadlinePassed
            ? p.isPi
              ? "To change it, withdraw it and reopen it as a draft; it keeps its code."
              : "The PI can withdraw it and reopen it as a draft before the deadline."
            : p.status === "withdrawn" && !p.call.deadlinePassed
              ? p.isPi
                ? "Reopen it as a draft to change it."
                : "The PI can reopen it as a draft before the deadline."
              : null}
        </p>
      ) : p.call.deadlinePassed ? (
        <p role="status" className="rounded-md border border-red-200 bg-red-50 px-4 py-2 text-sm text-red-800">
          The deadline of call {p.call.semesterCode} has passed: this draft can no longer be sent.
        </p>
      ) : null}
      <ReadinessStrip p={p} readiness={loaderData.readiness} submittedAt={loaderData.submittedAt} />
      <nav aria-label="Proposal sections" className="flex flex-wrap gap-1 border-b border-slate-300">
        {[...tabs.filter((tab) => (tab.to !== "epochs" || loaderData.epochTab) && (tab.to !== "decision" || loaderData.decisionTab)), ...(loaderData.showCharges ? [chargesTab] : [])].map((tab) => (
          <NavLink
            key={tab.label}
            to={tab.to}
            end={tab.end}
            prefetch="intent"
            className={({ isActive }) =>
              `-mb-px rounded-t-md border px-3 py-2 text-sm font-semibold no-underline hover:no-underline ${
                isActive ? "border-slate-300 border-b-white bg-white text-night-900" : "border-transparent text-slate-600 hover:text-night-800"
              }`
            }
          >
            {tab.label}
          </NavLink>
        ))}
      </nav>
      <Outlet />
    </div>
  );
}
