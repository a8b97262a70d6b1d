import { formatUtc as utc } from "~/lib/format";
import { orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { proposalHistory, type HistoryEntry } from "~/lib/proposals/proposals.server";
import type { Route } from "./+types/proposals.$proposalId.change-log";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { entries: await orNotFound(proposalHistory({ user, proposalId: proposalIdParam(params) })) };
}

const fieldNames: Record<string, string> = {
  title: "title",
  abstract: "abstract",
  scienceCategory: "science category",
  isMultiSemester: "multi-semester flag",
  semestersRequested: "semesters requested",
  isTargetOfOpportunity: "target-of-opportunity flag",
};

/** One sentence per audit entry, in the words of the workspace. */
function describeEntry(e: HistoryEntry): string {
  const d = (e.details ?? {}) as Record<string, unknown>;
  const s = (k: string) => String(d[k] ?? "");
  switch (e.action) {
    case "proposal.created":
      return `Started the proposal for call ${s("semesterCode")}.`;
    case "proposal.overview_updated": {
      const changed = (d.changed as string[] | undefined) ?? [];
      return changed.length ? `Changed the ${changed.map((c) => fieldNames[c] ?? c).join(", ")} in the overview.` : "Saved the overview (no change).";
    }
    case "member.invited":
      return `Invited ${s("email")} as Co-I.`;
    case "member.removed":
      return `Removed ${s("email")} from the team.`;
    case "member.left":
      return `${s("email")} left the team.`;
    case "member.pi_handed_over":
      return `Handed the PI role from ${s("from")} to ${s("to")}.`;
    case "target.added":
      return `Added the target ${s("name")}.`;
    case "target.updated":
      return `Edited the target ${s("name")}.`;
    case "target.deleted":
      return `Deleted the target ${s("name")}${Number(d.observations) ? ` and its ${s("observations")} observation(s)` : ""}.`;
    case "targets.imported":
      return `Imported ${s("accepted")} target(s) from CSV${Number(d.refused) ? `; ${s("refused")} row(s) refused` : ""}.`;
    case "observation.added":
      return `Added an observation of ${s("target")}${d.instrument ? ` with ${s("instrument")}` : ""}.`;
    case "observation.updated":
      return `Edited an observation of ${s("target")}.`;
    case "observation.deleted":
      return `Deleted an observation of ${s("target")}.`;
    case "proposal.submitted":
      return `Submitted the proposal${d.code ? ` as ${s("code")}` : ""}${d.keptCode ? " (it kept its code)" : ""}.`;
    case "proposal.receipt_queued":
      return `Receipt queued to ${((d.to as string[]) ?? []).join(", ")}${d.pdfError ? ` without the PDF (${s("pdfError")})` : " with the proposal PDF"}.`;
    case "proposal.withdrawn":
      return `Withdrew the proposal${Array.isArray(d.told) && d.told.length ? `; the team was told by e-mail (${(d.told as string[]).join(", ")})` : ""}.`;
    case "proposal.reopened":
      return "Reopened the proposal as a draft.";
    case "charge.page_charge_raised":
      return `Declared ${s("pages")} pages of the data-release paper; a page charge was raised.`;
    case "charge.checkout_started":
      return "Opened a payment page for a charge.";
    case "charge.checkout_expired":
      return "A payment page expired without payment; the charge stays unpaid.";
    case "charge.paid":
      return "A charge was paid; the receipt was mailed to the PI.";
    case "charge.waived":
      return `The observatory waived a charge: ${s("reason")}`;
    case "charge.payment_mismatch":
      return "A payment confirmation did not match the charge's amount and was not applied.";
    case "charge.paid_again":
      return "A second payment for a charge was received; the observatory will refund it.";
    default:
      if (e.action.startsWith("science_case")) return `Science case: ${e.action.split(".")[1]?.replace(/_/g, " ") ?? "changed"}${d.filename ? ` (${s("filename")})` : ""}.`;
      return `${e.action.replace(/[._]/g, " ")}.`;
  }
}

export default function ChangeLog({ loaderData }: Route.ComponentProps) {
  const { entries } = loaderData;
  return (
    <div className="space-y-3">
      <p className="text-sm text-slate-600">Every change to this proposal, newest first, as written to the audit log.</p>
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="table-base">
          <thead><tr><th>When</th><th>Who</th><th>What</th></tr></thead>
          <tbody>
            {entries.map((e) => (
              <tr key={e.id}>
                <td className="whitespace-nowrap tabular-nums">{utc(e.at)}</td>
                <td>{e.actor ?? <span className="text-slate-400">Nightshare</span>}</td>
                <td>{describeEntry(e)}</td>
              </tr>
            ))}
            {entries.length === 0 ? <tr><td colSpan={3} className="py-6 text-center text-slate-500">No changes recorded.</td></tr> : null}
          </tbody>
        </table>
      </div>
    </div>
  );
}
