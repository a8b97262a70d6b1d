import { createColumnHelper, getCoreRowModel, getFilteredRowModel, getSortedRowModel, useReactTable, type SortingState } from "@tanstack/react-table";
import { ReviewDutyBadge } from "~/components/allocation/ReviewDutyBadge";
import { useMemo, useState } from "react";
import { Form, Link, useActionData, useNavigation } from "react-router";
import { z } from "zod";
import { RaPressure } from "~/components/allocation/RaPressure";
import { Field, inputProps } from "~/components/Field";
import { SortableTable } from "~/components/SortableTable";
import { fixed, NONE } from "~/lib/format";
import { SemesterCheck } from "~/components/allocation/SemesterCheck";
import { fillAllocationByRank, lockAllocation, moveOnBoard, unlockAllocation } from "~/lib/allocation/allocate.server";
import { callBoard, conflictedLast, withholdConflicted } from "~/lib/allocation/board.server";
import { chairConflicts } from "~/lib/review/chair-conflicts.server";
import { CONFLICT_WITHHELD } from "~/lib/review/vocabulary";
import { boardUncertainty } from "~/lib/allocation/board-uncertainty";
import { inCoinFlipBand } from "~/lib/allocation/rank-uncertainty";
import { RankIntervalBar, ReproducibilityCard } from "~/components/allocation/RankUncertainty";
import { raPressureSection } from "~/lib/allocation/ra-pressure.server";
import { latestSemesterCheck, withholdPositions } from "~/lib/allocation/semester-check.server";
import type { FeasibilitySheet } from "~/lib/proposals/feasibility";
import { DISAGREEMENT_SPAN, MIN_GRADES } from "~/lib/allocation/normalise";
import { HIDDEN_TEAM } from "~/lib/domain";
import { requireRole } from "~/lib/auth/auth.server";
import { formAction, idParam, intent, orNotFound } from "~/lib/actions.server";
import { idSchema, valueText } from "~/lib/forms";
import { chairRankSchema, reasonSchema } from "~/lib/schemas/allocation";
import { scienceCategoryLabel } from "~/lib/proposals/vocabulary";
import { Telescope } from "~/models/index.server";
import { OwedEpochs } from "~/components/epochs/OwedEpochs";
import { owedBeforeCall } from "~/lib/epochs/epochs.server";
import type { Route } from "./+types/committee.$callId.board";

/** the proposals table is wide: the page takes the whole window */
export const handle = { wide: true };

export function meta({ data: d }: Route.MetaArgs) {
  return [{ title: `Ranking board ${d?.board.call.semesterCode ?? ""} · Committee · Nightshare` }];
}

const boardIntents = z.discriminatedUnion("intent", [
  // a checkbox: sent as "on" when ticked, absent otherwise
  intent("fill", z.object({ replaceHandSet: z.preprocess((v) => v === "on" || v === "true", z.boolean()) })),
  intent("lock"),
  intent("unlock", z.object({ reason: reasonSchema })),
  intent(
    "move",
    z.object({
      proposalId: idSchema("proposal"),
      // a form sends text: empty = the computed rank
      chairRank: z.preprocess((v) => (typeof v === "string" ? (v.trim() === "" ? null : Number(v)) : v), chairRankSchema),
      reason: reasonSchema,
    }),
  ),
]);

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireRole(request, "chair");
  const callId = idParam(params.callId, "call");
  return formAction(request, boardIntents, async (input) => {
    // `at` tells the page a new success apart from the last one (the move form then starts empty)
    const done = (message: string) => ({ ok: true as const, intent: input.intent, message, at: Date.now() });
    switch (input.intent) {
      case "fill": {
        const filled = await fillAllocationByRank({ actor: user, callId, replaceHandSet: input.replaceHandSet });
        const count = (tier: string) => filled.tiers.filter((t) => t.tier === tier).length;
        const kept = filled.kept.length ? ` ${filled.kept.length} proposal${filled.kept.length === 1 ? "" : "s"} whose hours you set by hand kept as ${filled.kept.length === 1 ? "it is" : "they are"}.` : "";
        return done(`Filled by rank: ${count("assured")} assured, ${count("queue")} queue, ${count("filler")} filler, ${filled.tiers.filter((t) => t.tier === null).length} without hours.${kept}`);
      }
      case "lock": {
        const { outcomes } = await lockAllocation({ actor: user, callId });
        return done(`Allocation locked: ${outcomes.accepted} accepted, ${outcomes.waitlisted} waitlisted, ${outcomes.declined} declined. Nobody has been told yet.`);
      }
      case "unlock":
        await unlockAllocation({ actor: user, callId, reason: input.reason });
        return done("Allocation unlocked; the proposals are in review again.");
      case "move":
        await moveOnBoard({ actor: user, callId, proposalId: input.proposalId, chairRank: input.chairRank, reason: input.reason });
        return done(input.chairRank === null ? "Returned to its computed rank." : `Moved to position ${input.chairRank}.`);
    }
  });
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireRole(request, "chair");
  const callId = idParam(params.callId, "call");
  const sheets = new Map<number, FeasibilitySheet>(); // read once for the board and its RA pressure
  const [board, telescopes, semesterCheck, conflicts] = await orNotFound(
    Promise.all([callBoard({ callId, sheets }), Telescope.findAll({ attributes: ["id", "name"], order: [["id", "ASC"]] }), latestSemesterCheck({ callId }), chairConflicts({ callId, chair: user })]),
  );
  const [raPressure, owed] = await orNotFound(Promise.all([raPressureSection({ callId, telescopeId: new URL(request.url).searchParams.get("telescopeId"), sheets }), owedBeforeCall({ callId })]));
  const { rows: drawn, reproducibility, coinFlip } = boardUncertainty(board);
  // the page needs each row's interval, not the grades the bootstrap drew from; a proposal this
  // chair is conflicted on shows its hours, not its grades
  const proposals = conflictedLast(withholdConflicted(
    board.proposals.map((row) => ({
      ...row,
      rankInterval: drawn.get(row.proposalId)?.rankInterval ?? null,
      probabilityAboveLine: drawn.get(row.proposalId)?.probabilityAboveLine ?? null,
    })),
    conflicts,
  ), conflicts) // their place would tell their grades
    .map(({ zScores: _z, ...row }) => ({ ...row, conflictReason: conflicts.get(row.proposalId)?.reason ?? null }));
  return { board: { ...board, proposals }, uncertainty: { reproducibility, coinFlip }, telescopes: telescopes.map((t) => ({ id: t.id, name: t.name })), semesterCheck: withholdPositions(semesterCheck, conflicts), raPressure, owed };
}

type Row = Route.ComponentProps["loaderData"]["board"]["proposals"][number];
const column = createColumnHelper<Row>();

/** In place of a conflicted proposal's grades: the message in full, or one word with it as the tooltip. */
function Withheld({ short = false }: { short?: boolean }) {
  return short ? <span className="text-xs text-amber-900" title={CONFLICT_WITHHELD}>withheld</span> : <span className="text-xs text-amber-900">{CONFLICT_WITHHELD}</span>;
}

export default function RankingBoard({ loaderData }: Route.ComponentProps) {
  const { board, uncertainty, telescopes, semesterCheck, raPressure, owed } = loaderData;
  const ranked = board.proposals.filter((p) => p.computedRank !== null).length;
  const actionData = useActionData<typeof action>();
  const busy = useNavigation().state !== "idle";
  const err = (field: string) => (actionData && !actionData.ok ? actionData.errors[field] : undefined);
  // what was typed comes back only with a refusal; after a success the forms start empty
  const typed = (field: string) => (actionData && !actionData.ok ? valueText(actionData.values, field) : undefined);
  const moveRefused = actionData && !actionData.ok && actionData.intent === "move";
  const { call } = board;
  const handSet = board.proposals.filter((p) => p.allocatedByHand);
  const conflicted = board.proposals.filter((p) => p.withheld !== null);
  const telescopeName = (id: number) => telescopes.find((t) => t.id === id)?.name ?? `telescope ${id}`;
  const [sorting, setSorting] = useState<SortingState>([{ id: "computedRank", desc: false }]);
  // the last semester check's outcome per programme, in the table beside the allocation
  const checkOf = useMemo(() => new Map((semesterCheck?.result?.programmes ?? []).map((o) => [o.proposalId, o])), [semesterCheck]);
  const stale = semesterCheck?.stale ?? false;
  const [filter, setFilter] = useState("");
  const columns = useMemo(() => {
    // the total, and under it the hours per telescope × moon category (and semester, for later ones)
    const requestedCell = (row: Row, total: number, thisSemester: boolean) => {
      if (row.requestedError) return "unknown";
      const parts = row.requested.filter((r) => r.hours > 0 && (r.semesterCode === call.semesterCode) === thisSemester);
      return (
        <span>
          {total.toFixed(1)}
          {parts.map((r) => (
            <span key={`${r.telescopeId}-${r.moonCategory}-${r.semesterCode}`} className="block whitespace-nowrap text-xs text-slate-600">
              {telescopeName(r.telescopeId)} {r.moonCategory}{thisSemester ? "" : ` ${r.semesterCode}`} {r.hours.toFixed(1)}
            </span>
          ))}
        </span>
      );
    };
    const hours = (row: Row, thisSemester: boolean) =>
      row.requested.filter((r) => (r.semesterCode === call.semesterCode) === thisSemester).reduce((sum, r) => sum + r.hours, 0);
    return [
      // undefined, not null, for "no rank": sortUndefined only places undefined last
      column.accessor((r) => r.computedRank ?? undefined, {
        id: "computedRank",
        header: "Rank (68 %)",
        sortUndefined: "last",
        cell: (c) => {
          const { rankInterval, withheld } = c.row.original;
          if (withheld) return <span data-testid={`withheld-${c.row.original.proposalId}`}><Withheld /></span>;
          const rank = c.getValue();
          if (rank === undefined || !rankInterval) return NONE;
          return (
            <span className="whitespace-nowrap" data-testid={`rank-${c.row.original.proposalId}`}>
              {rank} <span className="text-xs text-slate-600">({rankInterval.low}–{rankInterval.high})</span>{" "}
              <RankIntervalBar rank={rank} interval={rankInterval} count={ranked} />
            </span>
          );
        },
      }),
      column.accessor("probabilityAboveLine", {
        header: "Above line",
        sortUndefined: "last",
        cell: (c) => {
          const p = c.getValue();
          if (c.row.original.withheld) return <Withheld short />;
          if (p === null) return c.row.original.computedRank === null ? NONE : <span className="text-xs text-slate-600" title="It asks no hours of this semester">no hours</span>;
          return <span className="whitespace-nowrap" data-testid={`above-${c.row.original.proposalId}`}>{Math.round(p * 100)} %{inCoinFlipBand(p) ? <span className="ml-1 rounded bg-amber-200 px-1 text-xs text-amber-950">coin flip</span> : null}</span>;
        },
      }),
      column.accessor("chairRank", {
        header: "Chair's rank",
        sortUndefined: "last",
        cell: (c) => (c.getValue() === null ? NONE : <span title={c.row.original.chairRankReason ?? undefined}>{c.getValue()} <span className="text-xs text-slate-600">({c.row.original.chairRankReason})</span></span>),
      }),
      column.accessor((r) => r.code ?? "", { id: "code", header: "Code" }),
      column.accessor("title", { header: "Title" }),
      column.accessor((r) => (r.category ? scienceCategoryLabel(r.category) : ""), { id: "category", header: "Category" }),
      column.accessor((r) => r.piInstitution ?? "", { id: "institution", header: "PI institution" }),
      column.accessor("reviews", { header: "Reviews", cell: (c) => (c.row.original.withheld ? <Withheld short /> : c.getValue()) }),
      ...(board.proposals.some((r) => r.reviewDuty) ? [column.accessor((r) => (r.reviewDuty?.late ? 1 : 0), { id: "reviewDuty", header: "Team's reviews", cell: (c) => <ReviewDutyBadge duty={c.row.original.reviewDuty} withheld={c.row.original.rankWithheld} /> })] : []),
      column.accessor("rawMean", { header: "Raw mean", cell: (c) => (c.row.original.withheld ? <Withheld short /> : fixed(c.getValue(), 2)) }),
      column.accessor("normalisedScore", {
        header: "Normalised",
        cell: (c) => c.row.original.withheld ? <span data-testid={`normalised-withheld-${c.row.original.proposalId}`}><Withheld /></span> : (
          <span data-testid={`normalised-${c.row.original.proposalId}`}>
            {fixed(c.getValue(), 2)}
            {c.row.original.fallbackReviewerIds.length ? <span className="ml-1 text-xs text-amber-800" title="Some of its reviewers graded too few proposals, or gave one grade to all, and are placed on the panel's scale">({c.row.original.fallbackReviewerIds.length} on panel scale)</span> : null}
          </span>
        ),
      }),
      column.accessor("spread", { header: "Spread (σ)", cell: (c) => (c.row.original.withheld ? <Withheld short /> : fixed(c.getValue(), 2)) }),
      column.accessor("disagreement", { header: "Reviewers", cell: (c) => (c.row.original.withheld ? <Withheld short /> : c.getValue() ? <span className="rounded bg-amber-100 px-1.5 py-0.5 text-amber-900">disagree</span> : "agree") }),
      column.accessor((r) => hours(r, true), { id: "hoursThis", header: `Requested ${call.semesterCode}`, cell: (c) => requestedCell(c.row.original, c.getValue(), true) }),
      column.accessor((r) => hours(r, false), { id: "hoursLater", header: "Requested later", cell: (c) => requestedCell(c.row.original, c.getValue(), false) }),
      column.accessor((r) => r.tier ?? "", {
        id: "tier",
        header: "Tier",
        cell: (c) => (
          <span>
            {c.getValue() || NONE}
            {c.row.original.allocatedByHand ? <span className="block text-xs text-slate-600" title="Set by hand on the allocation page: fill by rank keeps it">by hand</span> : null}
          </span>
        ),
      }),
      column.accessor((r) => r.allocation.filter((a) => a.semesterCode === call.semesterCode).reduce((sum, a) => sum + a.hours, 0), { id: "allocated", header: `Allocated ${call.semesterCode}`, cell: (c) => c.getValue().toFixed(1) }),
      column.accessor((r) => checkOf.get(r.proposalId)?.completionProbability ?? null, {
        id: "completion",
        header: "Completes (check)",
        sortUndefined: "last",
        cell: (c) => {
          const outcome = checkOf.get(c.row.original.proposalId);
          if (!outcome || outcome.completionProbability === null) return NONE;
          return (
            <span data-testid={`completion-${c.row.original.proposalId}`} className={stale ? "text-slate-500" : undefined} title={stale ? "From a check whose inputs have changed since" : undefined}>
              {Math.round(outcome.completionProbability * 100)} %
              {outcome.flag ? <span className="ml-1 rounded bg-red-100 px-1.5 py-0.5 text-xs text-red-900">{outcome.flag === "assured-below-goal" ? "assured < 90 %" : "queue < 50 %"}</span> : null}
            </span>
          );
        },
      }),
    ];
  }, [call.semesterCode, checkOf, stale, ranked, board.proposals]);
  const table = useReactTable({
    data: board.proposals,
    columns,
    state: { sorting, globalFilter: filter },
    onSortingChange: setSorting,
    onGlobalFilterChange: setFilter,
    globalFilterFn: "includesString",
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
  });
  const maxRatio = Math.max(1, ...board.oversubscription.map((o) => o.ratio ?? 0));
  return (
    <div className="space-y-6">
      <p className="text-sm"><Link to="/committee">Committee</Link> › <Link to={`/committee/${call.id}`}>{call.semesterCode}</Link> › Ranking board</p>
      <h1>Ranking board for {call.semesterCode}</h1>
      <nav aria-label="Allocation and exports" className="flex flex-wrap gap-4 text-sm">
        <Link to={`/committee/${call.id}/allocation`}>Hours and tiers, with running totals</Link>
        <a href={`/committee/${call.id}/ranked-list.csv`} download>Ranked list (CSV)</a>
        <a href={`/committee/${call.id}/allocation.csv`} download>Allocation (CSV)</a>
      </nav>
      {actionData?.ok ? <p role="status" className="rounded-md border border-emerald-300 bg-emerald-50 px-3 py-2 text-emerald-900">{actionData.message}</p> : null}
      {err("form") || err("allocation") || err("rows.0.proposalId") ? <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-red-800">{err("form") ?? err("allocation") ?? err("rows.0.proposalId")}</p> : null}
      <section className="card space-y-2">
        <h2>Oversubscription</h2>
        <p className="text-sm text-slate-700">Requested hours for {call.semesterCode} against offered hours, less what earlier calls' locked allocations already committed to this semester.</p>
        <table className="table-base">
          <thead><tr><th>Telescope</th><th>Moon</th><th>Requested h</th><th>Offered h</th><th>Committed h</th><th>Ratio</th><th className="w-1/3"></th></tr></thead>
          <tbody>
            {board.oversubscription.map((o) => (
              <tr key={`${o.telescopeId}-${o.moonCategory}`}>
                <td>{telescopeName(o.telescopeId)}</td>
                <td>{o.moonCategory}</td>
                <td>{o.requestedHours.toFixed(1)}</td>
                <td>{o.offeredHours.toFixed(1)}</td>
                <td>{o.committedHours.toFixed(1)}</td>
                <td data-testid={`ratio-${o.telescopeId}-${o.moonCategory}`}>{o.ratio === null ? "nothing offered" : `${o.ratio.toFixed(2)}×`}</td>
                <td>
                  <div className="relative h-3 rounded bg-slate-100" aria-hidden>
                    <div className={`absolute inset-y-0 left-0 rounded ${o.ratio !== null && o.ratio > 1 ? "bg-red-500" : "bg-emerald-500"}`} style={{ width: `${Math.min(100, ((o.ratio ?? 0) / maxRatio) * 100)}%` }} />
                    <div className="absolute inset-y-0 border-l-2 border-slate-700" style={{ left: `${(1 / maxRatio) * 100}%` }} title="offered" />
                  </div>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
        <OwedEpochs owed={owed} />
      </section>
      <ReproducibilityCard uncertainty={uncertainty} telescopeName={telescopeName} />
      <section className="space-y-2">
        <div className="flex flex-wrap items-end justify-between gap-2">
          <h2>Proposals</h2>
          <label className="text-sm">Filter <input className="input ml-1 w-64" value={filter} onChange={(e) => setFilter(e.target.value)} placeholder="code, title, category, institution" /></label>
        </div>
        <p className="text-sm text-slate-700">
          Each reviewer's overall merits become z-scores within that reviewer's own grades in this call; a proposal's normalised score is the mean of its reviewers' z-scores, mapped back to the 1–10 scale around the panel's mean ({fixed(board.panel.mean, 2)}) and spread ({fixed(board.panel.sd, 2)}).
          A reviewer with fewer than {MIN_GRADES} grades, or one grade for everything, is placed on the panel's scale instead. Reviewers disagree when their z-scores span more than {DISAGREEMENT_SPAN}.
        </p>
        {board.proposals.some((p) => p.piInstitution === HIDDEN_TEAM) ? <p className="text-sm text-slate-700" data-testid="teams-hidden">Dual-anonymous review: PI institutions are hidden until you reveal the teams on the <Link to={`/committee/${board.call.id}`}>call's review page</Link>, once every grade is in.</p> : null}
        <SortableTable table={table} empty="No proposal on the board matches." rowClassName={(row) => (inCoinFlipBand(row.probabilityAboveLine) ? "bg-amber-50 hover:bg-amber-100" : undefined)} />
      </section>
      <section className="card space-y-3">
        <h2>Allocation</h2>
        {board.locked ? (
          <>
            <p>The allocation is locked: ranking and hours cannot change until you unlock it with a reason.</p>
            <Form method="post" className="flex flex-wrap items-end gap-3" noValidate>
              <input type="hidden" name="intent" value="unlock" />
              <Field label="Reason for unlocking" id="unlockReason" error={err("reason")}>
                <input {...inputProps("unlockReason", err("reason"))} name="reason" className="input w-96" defaultValue={actionData && !actionData.ok && actionData.intent === "unlock" ? typed("reason") : ""} />
              </Field>
              <button className="btn" disabled={busy}>Unlock</button>
            </Form>
          </>
        ) : (
          <div className="space-y-3">
            <div className="flex flex-wrap gap-3">
              <Form method="post" className="flex flex-wrap items-center gap-3">
                <button className="btn" name="intent" value="fill" disabled={busy}>Fill by rank</button>
                {handSet.length ? (
                  <label className="text-sm" data-testid="replace-hand-set">
                    <input type="checkbox" name="replaceHandSet" className="mr-1" />
                    also refill the {handSet.length} proposal{handSet.length === 1 ? "" : "s"} whose hours you set by hand ({handSet.map((p) => p.code ?? `#${p.proposalId}`).join(", ")})
                  </label>
                ) : null}
              </Form>
              <Form method="post"><button className="btn" name="intent" value="lock" disabled={busy}>Lock the allocation</button></Form>
            </div>
            <p className="text-sm text-slate-700">Fill by rank gives each proposal, down the board's order, its requested hours and the first tier that still holds them: assured up to {Math.round(board.settings.assuredShareLimit * 100)} % of offered, queue up to offered, filler up to offered + {Math.round(board.settings.fillerMargin * 100)} %. What you set by hand on the allocation page (hours, tier, waitlist) is kept and counted first, unless you tick the box. Locking sets the outcomes: hours allocated → accepted, the rest declined.</p>
            <Form key={actionData?.ok ? actionData.at : "move"} method="post" className="flex flex-wrap items-end gap-3" noValidate>
              <input type="hidden" name="intent" value="move" />
              <Field label="Move proposal" id="moveProposal" error={err("proposalId")}>
                <select id="moveProposal" aria-invalid={err("proposalId") ? true : undefined} aria-describedby={err("proposalId") ? "moveProposal-error" : undefined} name="proposalId" className="input" defaultValue={moveRefused ? typed("proposalId") : ""}>
                  <option value="">Choose…</option>
                  {board.proposals.map((p) => <option key={p.proposalId} value={p.proposalId} disabled={p.withheld !== null}>{p.code} {p.title}{p.withheld ? " (you have a conflict)" : ""}</option>)}
                </select>
              </Field>
              <Field label="To position (empty = computed)" id="moveRank" error={err("chairRank")}>
                <input {...inputProps("moveRank", err("chairRank"))} name="chairRank" inputMode="numeric" className="input w-28" defaultValue={moveRefused ? typed("chairRank") : ""} />
              </Field>
              <Field label="Reason" id="moveReason" error={moveRefused ? err("reason") : undefined}>
                <input {...inputProps("moveReason", moveRefused ? err("reason") : undefined)} name="reason" className="input w-80" defaultValue={moveRefused ? typed("reason") : ""} />
              </Field>
              <button className="btn" disabled={busy}>Move</button>
            </Form>
            {conflicted.length ? (
              <p className="text-sm text-amber-900" data-testid="move-conflicts">
                You cannot move {conflicted.map((p) => `${p.code ?? `#${p.proposalId}`} (${p.conflictReason})`).join(", ")}: you have a conflict on {conflicted.length === 1 ? "this proposal" : "these proposals"}, so {conflicted.length === 1 ? "its" : "their"} grades are withheld from you and another chair decides {conflicted.length === 1 ? "its" : "their"} place and hours. Fill by rank places {conflicted.length === 1 ? "it" : "them"} by the computed rank only.
              </p>
            ) : null}
          </div>
        )}
      </section>
      <SemesterCheck key={call.id} callId={call.id} latest={semesterCheck} />
      <RaPressure view={raPressure} />
    </div>
  );
}
