import { useMemo, useState } from "react";
import { Link, useRevalidator } from "react-router";
import { HelpfulnessCell } from "~/components/committee/HelpfulnessCell";
import { idParam, orNotFound } from "~/lib/actions.server";
import { requireRole } from "~/lib/auth/auth.server";
import { scienceCategoryLabel } from "~/lib/proposals/vocabulary";
import { reviewBoard } from "~/lib/review/chair.server";
import { helpfulnessByReviewer } from "~/lib/review/helpfulness.server";
import { SUGGESTION_METHOD } from "~/lib/review/suggest";
import type { Route } from "./+types/committee.$callId.assignments";

export function meta({ data: d }: Route.MetaArgs) {
  return [{ title: `Assignments of ${d?.board.call.semesterCode ?? "a call"} · Committee · Nightshare` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireRole(request, "chair");
  const callId = idParam(params.callId, "call");
  const [board, helpfulness] = await orNotFound(Promise.all([reviewBoard({ callId, viewer: user }), helpfulnessByReviewer({ callId })]));
  return { board, helpfulness, method: SUGGESTION_METHOD };
}

type Pair = { proposalId: number; reviewerId: number };
type Suggestion = {
  assignments: Pair[];
  loads: { reviewerId: number; count: number }[];
  impossible: { proposalId: number; reason: string }[];
  short?: { reviewerId: number; count: number; reason: string }[];
  balanced: boolean;
};
const key = (p: number, r: number) => `${p}:${r}`;

async function callApi(url: string, method: string, body: unknown) {
  const res = await fetch(url, { method, headers: { "Content-Type": "application/json", Accept: "application/json" }, body: JSON.stringify(body), credentials: "same-origin" });
  const json = await res.json().catch(() => ({ error: `The server answered ${res.status}.` }));
  return { ok: res.ok, json };
}

export default function Assignments({ loaderData }: Route.ComponentProps) {
  const { board, method, helpfulness } = loaderData;
  const { call, review } = board;
  const distributed = call.reviewMode === "distributed";
  const reviewerName = (id: number) => board.panel.find((r) => r.reviewerId === id)?.name ?? `user ${id}`;
  const revalidator = useRevalidator();
  const saved = useMemo(() => new Set(board.assignments.filter((a) => a.status !== "conflict").map((a) => key(a.proposalId, a.reviewerId))), [board.assignments]);
  const [pairs, setPairs] = useState<Set<string>>(saved);
  const [perProposal, setPerProposal] = useState(String(review.perProposal));
  const [suggestion, setSuggestion] = useState<Suggestion | null>(null);
  const [message, setMessage] = useState<{ tone: "ok" | "error"; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const conflicts = useMemo(() => new Map(board.conflicts.map((c) => [key(c.proposalId, c.reviewerId), c.reason])), [board.conflicts]);
  const locked = useMemo(() => new Map(board.assignments.filter((a) => a.status === "draft" || a.status === "submitted").map((a) => [key(a.proposalId, a.reviewerId), a.status])), [board.assignments]);
  const loads = board.panel.map((r) => ({ ...r, count: board.proposals.filter((p) => pairs.has(key(p.proposalId, r.reviewerId))).length }));
  const counts = loads.map((l) => l.count);
  const spread = counts.length ? Math.max(...counts) - Math.min(...counts) : 0;
  const k = Number(perProposal) || review.perProposal;
  const short = board.proposals.filter((p) => !p.withheld && board.panel.filter((r) => pairs.has(key(p.proposalId, r.reviewerId))).length < k);
  const dirty = pairs.size !== saved.size || [...pairs].some((x) => !saved.has(x));

  function toggle(p: number, r: number) {
    const id = key(p, r);
    if (conflicts.has(id) || locked.has(id)) return;
    const next = new Set(pairs);
    if (next.has(id)) next.delete(id);
    else next.add(id);
    setPairs(next);
    setMessage(null);
  }

  async function suggest() {
    setBusy(true);
    setMessage(null);
    const { ok, json } = await callApi(`/api/v1/calls/${call.id}/review/suggest`, "POST", { perProposal: Number(perProposal) });
    setBusy(false);
    if (!ok) return setMessage({ tone: "error", text: json.issues?.[0] ? `Reviewers per proposal ${json.issues[0].message}.` : json.error });
    setSuggestion(json as Suggestion);
  }

  function accept() {
    if (!suggestion) return;
    const next = new Set(suggestion.assignments.map((a) => key(a.proposalId, a.reviewerId)));
    for (const id of locked.keys()) next.add(id);
    setPairs(next);
    setMessage({ tone: "ok", text: "Suggestion accepted into the matrix (not saved yet)." });
  }

  async function save(commit: boolean) {
    setBusy(true);
    const assignments = [...pairs].map((x) => {
      const [proposalId, reviewerId] = x.split(":").map(Number);
      return { proposalId, reviewerId };
    });
    const { ok, json } = await callApi(`/api/v1/calls/${call.id}/review/assignments`, "PUT", { assignments, commit });
    setBusy(false);
    if (!ok) return setMessage({ tone: "error", text: json.error ?? "The assignment was not saved." });
    setMessage({ tone: "ok", text: commit ? `Committed: ${json.pairs} pairs; ${json.mailed} reviewer${json.mailed === 1 ? "" : "s"} e-mailed their list.` : `Saved: ${json.pairs} pairs (${json.added} added, ${json.removed} removed).` });
    setSuggestion(null);
    revalidator.revalidate();
  }

  const proposalLabel = (id: number) => board.proposals.find((p) => p.proposalId === id)?.code ?? `#${id}`;
  return (
    <div className="space-y-5">
      <p className="text-sm"><Link to="/committee">Committee</Link> › <Link to={`/committee/${call.id}`}>{call.semesterCode}</Link> › Assignments</p>
      <h1>Assignments for {call.semesterCode}</h1>
      {!review.startedAt ? <p role="alert" className="rounded-md border border-amber-300 bg-amber-50 px-3 py-2">Put the call's proposals in review first (on the <Link to={`/committee/${call.id}`}>call's review page</Link>).</p> : null}
      <section className="card space-y-3">
        <div className="flex flex-wrap items-end gap-3">
          {distributed ? (
            <p className="max-w-xl text-sm" data-testid="distributed-note">
              Reviewed by its submitters: each team's designated reviewer gets {call.reviewsPerSubmitter} proposals of the call (a reviewer several teams designated, {call.reviewsPerSubmitter} for each), never their own{call.separateCompetitors ? " nor one asking for the same telescope and moon category as theirs" : ""}.
            </p>
          ) : (
            <div>
              <label htmlFor="perProposal">Reviewers per proposal</label>
              <input id="perProposal" className="input w-24" type="number" min={1} max={10} value={perProposal} onChange={(e) => setPerProposal(e.target.value)} />
            </div>
          )}
          <button type="button" className="btn" onClick={suggest} disabled={busy}>Suggest reviewers</button>
          {suggestion ? <button type="button" className="btn" onClick={accept} disabled={busy}>Accept the suggestion</button> : null}
          <button type="button" className="btn-quiet" onClick={() => save(false)} disabled={busy || !dirty}>Save the matrix</button>
          <button type="button" className="btn" onClick={() => save(true)} disabled={busy || pairs.size === 0}>Commit and e-mail the reviewers</button>
        </div>
        <p className="text-xs text-slate-500">
          {distributed
            ? `The suggestion is a ${method}: every designated reviewer gets ${call.reviewsPerSubmitter} proposals per team that designated them, free of conflicts where possible, the reviews are spread evenly over the proposals, and proposals of the reviewer's own category come first.`
            : `The suggestion is a ${method}: every proposal gets ${k} reviewers free of conflicts where possible, loads stay within one, and reviewers who know the category come first.`}
        </p>
        {suggestion ? (
          <div className="rounded-md border border-night-200 bg-night-50 p-3 text-sm" aria-label="Suggestion">
            <p>Suggested: {suggestion.assignments.length} pairs; loads {Math.min(...suggestion.loads.map((l) => l.count))}–{Math.max(...suggestion.loads.map((l) => l.count))}{suggestion.balanced ? "" : " (the conflicts do not allow loads within one)"}.</p>
            {suggestion.short?.length ? (
              <ul className="mt-1 list-disc pl-5 text-amber-900" aria-label="Reviewers with fewer proposals">
                {suggestion.short.map((x) => <li key={x.reviewerId}>{reviewerName(x.reviewerId)} gets {x.count}: {x.reason}.</li>)}
              </ul>
            ) : distributed ? <p>Every designated reviewer gets {call.reviewsPerSubmitter} proposals per team that designated them.</p> : null}
            {distributed && !suggestion.impossible.length ? null : suggestion.impossible.length ? (
              <ul className="mt-1 list-disc pl-5 text-red-800">
                {suggestion.impossible.map((x) => <li key={x.proposalId}>Impossible for {proposalLabel(x.proposalId)}: {x.reason}.</li>)}
              </ul>
            ) : <p>Every proposal gets {k} reviewers.</p>}
          </div>
        ) : null}
        {message ? <p role={message.tone === "error" ? "alert" : "status"} className={message.tone === "error" ? "rounded-md border border-red-200 bg-red-50 px-3 py-2 text-red-800" : "rounded-md border border-emerald-300 bg-emerald-50 px-3 py-2 text-emerald-900"}>{message.text}</p> : null}
        <p className="text-sm" aria-live="polite">
          {pairs.size} pairs · loads {counts.length ? `${Math.min(...counts)}–${Math.max(...counts)}` : "—"}{spread > 1 ? " (more than one apart)" : ""} · {distributed
            ? (() => {
                // k for each team that designated the reviewer
                const under = loads.filter((l) => l.count < call.reviewsPerSubmitter * Math.max(1, l.teams ?? 1)).length;
                return under ? `${under} reviewer${under === 1 ? "" : "s"} with fewer than they owe` : `every reviewer has ${call.reviewsPerSubmitter} per team`;
              })()
            : short.length ? `${short.length} proposal${short.length === 1 ? "" : "s"} with fewer than ${k}` : `every proposal has ${k}`}
          {dirty ? " · unsaved changes" : ""} · {review.committedAt ? "committed" : "not committed"}
        </p>
      </section>
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="table-base text-sm" aria-label="Assignment matrix">
          <thead>
            <tr>
              <th>Proposal</th>
              {loads.map((r) => (
                <th key={r.reviewerId} className="text-center">
                  <span className="block">{r.name}</span>
                  <span className="block text-xs font-normal text-slate-500">{r.institution ?? ""}</span>
                  <span className="block text-xs font-normal" data-load={r.reviewerId}>load {r.count}</span>
                  <HelpfulnessCell figures={helpfulness.find((h) => h.reviewerId === r.reviewerId)} reviewerId={r.reviewerId} />
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {board.proposals.map((p) => (
              <tr key={p.proposalId}>
                <td>
                  <span className="font-semibold">{p.code ?? `#${p.proposalId}`}</span> {p.title}
                  <span className="block text-xs text-slate-500">{scienceCategoryLabel(p.category) ?? "no category"} · PI: {p.piInstitution ?? "?"}</span>
                </td>
                {p.withheld ? (
                  <td colSpan={Math.max(1, board.panel.length)} className="bg-amber-50 text-sm text-amber-900" data-testid={`assign-withheld-${p.proposalId}`}>
                    Reviewers {p.withheld} ({p.conflictReason}): another chair assigns them.
                  </td>
                ) : board.panel.map((r) => {
                  const id = key(p.proposalId, r.reviewerId);
                  const reason = conflicts.get(id);
                  const on = pairs.has(id);
                  const knows = p.category && r.categories.includes(p.category);
                  return (
                    <td key={r.reviewerId} className={`text-center ${reason ? "bg-red-50" : on ? "bg-emerald-50" : ""}`}>
                      {reason ? (
                        <span className="text-xs text-red-800" title={reason}>conflict: {reason}</span>
                      ) : (
                        <label className="inline-flex items-center gap-1 font-normal">
                          <input type="checkbox" checked={on} disabled={locked.has(id)} onChange={() => toggle(p.proposalId, r.reviewerId)} aria-label={`${p.code ?? p.proposalId} × ${r.name}`} />
                          {knows ? <span className="text-xs text-slate-500" title="knows the category">★</span> : null}
                          {locked.has(id) ? <span className="text-xs text-slate-500">{locked.get(id)}</span> : null}
                        </label>
                      )}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
