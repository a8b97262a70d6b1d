import { redirect } from "react-router";
import { z } from "zod";
import { Breadcrumbs } from "~/components/office/Breadcrumbs";
import { CallForm } from "~/components/office/CallForm";
import { resultFor } from "~/components/office/fields";
import { requireRole } from "~/lib/auth/auth.server";
import { callFormContext, emptyCallForm } from "~/lib/office/call-form.server";
import { createCall, listCalls, observatoryTimeZone } from "~/lib/office/office.server";
import { formAction, intent } from "~/lib/actions.server";
import { callSchemaInZone } from "~/lib/schemas/office";
import type { Route } from "./+types/admin.calls.new";

export function meta() {
  return [{ title: "New call · Observatory office · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  const [context, calls] = await Promise.all([callFormContext(), listCalls()]);
  const latest = [...calls].sort((a, b) => b.semesterEnd.localeCompare(a.semesterEnd))[0] ?? null;
  return { ...context, initial: emptyCallForm(latest) };
}

const newCallIntents = (timeZone: string) => z.discriminatedUnion("intent", [intent("create", callSchemaInZone(timeZone))]);

export async function action({ request }: Route.ActionArgs) {
  const actor = await requireRole(request, "admin");
  return formAction(request, newCallIntents(await observatoryTimeZone()), async ({ intent: _, ...values }) => {
    await createCall({ actor, values });
    return redirect(`/admin/calls?saved=${values.semesterCode}`);
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
