import { redirect } from "react-router";
import { Breadcrumbs } from "~/components/office/Breadcrumbs";
import { CallForm } from "~/components/office/CallForm";
import { resultFor } from "~/components/office/fields";
import { requireRole } from "~/lib/auth/auth.server";
import { callFormContext, emptyCallForm } from "~/lib/office/call-form.server";
import { createCall, listCalls, observatoryTimeZone } from "~/lib/office/office.server";
import { formValues, handle } from "~/lib/office/forms.server";
import { callSchema } from "~/lib/schemas/office";
import type { Route } from "./+types/admin.calls.new";
import { readForm } from "~/lib/forms";

export function meta() {
  return [{ title: "New call · Observatory office · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  const [context, calls] = await Promise.all([callFormContext(), listCalls()]);
  const latest = [...calls].sort((a, b) => b.semesterEnd.localeCompare(a.semesterEnd))[0] ?? null;
  return { ...context, initial: emptyCallForm(latest) };
}

export async function action({ request }: Route.ActionArgs) {
  const actor = await requireRole(request, "admin");
  const values = formValues(await readForm(request));
  // The wall clock is the observatory's, whatever the form says.
  values.timeZone = await observatoryTimeZone();
  return handle({ intent: "create", values, schema: callSchema }, async (input) => {
    await createCall({ actor, values: input });
    return redirect(`/admin/calls?saved=${input.semesterCode}`);
  });
}

export default function NewCall({ loaderData, actionData }: Route.ComponentProps) {
  return (
    <div className="space-y-6">
      <Breadcrumbs trail={[{ to: "/admin", label: "Observatory office" }, { to: "/admin/calls", label: "Calls" }, { label: "New call" }]} />
      <h1>New call for proposals</h1>
      <CallForm
        intent="create"
        initial={loaderData.initial}
        result={resultFor(actionData, "create")}
        timeZone={loaderData.timeZone}
        telescopes={loaderData.telescopes}
        submitLabel="Create the call"
      />
    </div>
  );
}
