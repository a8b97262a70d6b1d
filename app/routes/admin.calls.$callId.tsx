import { redirect } from "react-router";
import { z } from "zod";
import { Breadcrumbs } from "~/components/office/Breadcrumbs";
import { CallForm } from "~/components/office/CallForm";
import { resultFor } from "~/components/office/fields";
import { committedHours } from "~/lib/allocation/board.server";
import { requireRole } from "~/lib/auth/auth.server";
import { callFormContext, callToForm } from "~/lib/office/call-form.server";
import { getCall, observatoryTimeZone, updateCall } from "~/lib/office/office.server";
import { formAction, idParam, intent, orNotFound } from "~/lib/actions.server";
import { callSchemaInZone } from "~/lib/schemas/office";
import type { Route } from "./+types/admin.calls.$callId";

export function meta({ data }: Route.MetaArgs) {
  return [{ title: `Call ${data?.semesterCode ?? ""} · Observatory office · Nightshare` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  const callId = idParam(params.callId, "call");
  const [call, context] = await Promise.all([orNotFound(getCall({ callId })), callFormContext()]);
  // later semesters of earlier calls' multi-semester programmes, once those calls are locked
  const committed = Object.fromEntries(await committedHours({ callId, semesterCode: call.semesterCode }));
  return { ...context, semesterCode: call.semesterCode, initial: callToForm(call, context.timeZone), committed };
}

const callIntents = (timeZone: string) => z.discriminatedUnion("intent", [intent("update", callSchemaInZone(timeZone))]);

export async function action({ request, params }: Route.ActionArgs) {
  const actor = await requireRole(request, "admin");
  const callId = idParam(params.callId, "call");
  return formAction(request, callIntents(await observatoryTimeZone()), async ({ intent: _, ...values }) => {
    await updateCall({ actor, callId, values });
    return redirect(`/admin/calls?saved=${values.semesterCode}`);
  });
}

export default function EditCall({ loaderData, actionData }: Route.ComponentProps) {
  return (
    <div className="space-y-6">
      <Breadcrumbs
        trail={[{ to: "/admin", label: "Observatory office" }, { to: "/admin/calls", label: "Calls" }, { label: loaderData.semesterCode }]}
      />
      <h1>Call {loaderData.semesterCode}</h1>
      <CallForm
        intent="update"
        initial={loaderData.initial}
        result={resultFor(actionData, "update")}
        timeZone={loaderData.timeZone}
        telescopes={loaderData.telescopes}
        submitLabel="Save the call"
        committed={loaderData.committed}
      />
      {Object.keys(loaderData.committed).length ? (
        <p className="text-sm text-slate-700">Hours marked “already committed” belong to multi-semester programmes of earlier calls whose allocations are locked; the ranking board of this call subtracts them from the offered hours.</p>
      ) : null}
    </div>
  );
}
