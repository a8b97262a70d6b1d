import { Link, useActionData, useNavigation } from "react-router";
import { AllocationSheet } from "~/components/allocation/AllocationSheet";
import { allocationSheet, saveAllocationSheet } from "~/lib/allocation/sheet.server";
import { requireRole } from "~/lib/auth/auth.server";
import { failure, idParam, orNotFound, refusalFailure, UNKNOWN_INTENT } from "~/lib/actions.server";
import { fieldErrors } from "~/lib/forms";
import { allocationSheetSchema } from "~/lib/schemas/allocation";
import type { Route } from "./+types/committee.$callId.allocation";

/** the proposals table is wide: the page takes the whole window */
export const handle = { wide: true };

export function meta({ data: d }: Route.MetaArgs) {
  return [{ title: `Allocation ${d?.sheet.call.semesterCode ?? ""} · Committee · Nightshare` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireRole(request, "chair");
  return { sheet: await orNotFound(allocationSheet({ callId: idParam(params.callId, "call"), chair: user })) };
}

/**
 * The page posts its rows as JSON (`intent: "save"`, the sheet's nested rows are no flat form), so
 * this action reads JSON rather than going through `formAction`; its answers are the same
 * `ActionFailure`s, and the rows are checked again here.
 */
export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireRole(request, "chair");
  const callId = idParam(params.callId, "call");
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    return failure("save", { form: "The allocation did not arrive as JSON; reload the page and try again." }, {});
  }
  const parsed = allocationSheetSchema.safeParse(body);
  if (!parsed.success) {
    const errors = fieldErrors(parsed.error);
    return errors.intent ? failure("unknown", { form: UNKNOWN_INTENT }, {}) : failure("save", errors, {});
  }
  try {
    const saved = await saveAllocationSheet({ actor: user, callId, sheet: parsed.data });
    return { ok: true as const, intent: parsed.data.intent, message: `Allocation saved: ${saved.rows} cells with hours over ${saved.proposals} proposals.` };
  } catch (error) {
    return refusalFailure(error, parsed.data.intent, {});
  }
}

export default function AllocationPage({ loaderData }: Route.ComponentProps) {
  const { sheet } = loaderData;
  const actionData = useActionData<typeof action>();
  const busy = useNavigation().state !== "idle";
  // a new key after each save re-reads the saved values into the form
  const version = sheet.rows.map((r) => `${r.tier}${r.waitlisted}${r.cells.map((c) => c.allocatedHours).join()}${r.laterCells.map((c) => c.allocatedHours).join()}`).join("|");
  return (
    <div className="space-y-5">
      <p className="text-sm">
        <Link to="/committee">Committee</Link> › <Link to={`/committee/${sheet.call.id}`}>{sheet.call.semesterCode}</Link> › <Link to={`/committee/${sheet.call.id}/board`}>Ranking board</Link> › Allocation
      </p>
      <h1>Allocation for {sheet.call.semesterCode}</h1>
      <p className="max-w-3xl text-slate-700">
        Proposals in the board's order (the chair's positions in place). Set each one's tier and hours per telescope and moon category; the running totals and the line where offered runs out follow what you type.
        Offered is the call's hours less what earlier calls' locked allocations committed to {sheet.call.semesterCode}; hours for later semesters become commitments of those semesters once the allocation is locked.
      </p>
      {sheet.locked ? <p className="rounded-md border border-slate-300 bg-slate-50 px-3 py-2">The allocation is locked. Unlock it on the <Link to={`/committee/${sheet.call.id}/board`}>ranking board</Link>, with a reason, to change it.</p> : null}
      {actionData?.ok ? <p role="status" className="rounded-md border border-emerald-300 bg-emerald-50 px-3 py-2 text-emerald-900">{actionData.message}</p> : null}
      {sheet.columns.length === 0 ? (
        <p>The call offers no hours, so there is nothing to allocate.</p>
      ) : (
        <AllocationSheet
          key={version}
          semesterCode={sheet.call.semesterCode}
          columns={sheet.columns}
          rows={sheet.rows}
          started={sheet.started}
          locked={sheet.locked}
          settings={sheet.settings}
          serverErrors={actionData && !actionData.ok ? actionData.errors : {}}
          busy={busy}
          basedOn={sheet.basedOn}
        />
      )}
    </div>
  );
}
