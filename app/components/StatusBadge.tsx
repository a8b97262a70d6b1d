import { proposalStatusLabels, type ProposalStatus } from "~/lib/domain";

const tone: Record<ProposalStatus, string> = {
  draft: "bg-slate-100 text-slate-700 border-slate-300",
  submitted: "bg-night-100 text-night-800 border-night-700/40",
  in_review: "bg-dusk-100 text-night-900 border-dusk-400",
  accepted: "bg-emerald-50 text-emerald-800 border-emerald-300",
  waitlisted: "bg-amber-50 text-amber-800 border-amber-300",
  declined: "bg-rose-50 text-rose-800 border-rose-300",
  withdrawn: "bg-white text-slate-500 border-slate-300 line-through decoration-slate-400/60",
};

export function StatusBadge({ status }: { status: ProposalStatus }) {
  return <span className={`inline-block rounded-full border px-2 py-0.5 text-xs font-semibold ${tone[status]}`}>{proposalStatusLabels[status]}</span>;
}
