import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import { Form, redirect, useActionData, useSubmit } from "react-router";
import { z } from "zod";
import { Field, inputProps } from "~/components/Field";
import { writeAudit } from "~/lib/audit.server";
import { requireUser, safeRedirectTo } from "~/lib/auth/auth.server";
import { formAction, intent } from "~/lib/actions.server";
import { valueText, type ActionFailure } from "~/lib/forms";
import { profileSchema } from "~/lib/schemas/auth";
import { User } from "~/models/index.server";
import type { Route } from "./+types/welcome";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { email: user.email, name: user.name ?? "", institution: user.institution ?? "" };
}

const welcomeIntents = z.discriminatedUnion("intent", [intent("save", profileSchema)]);

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  return formAction(request, welcomeIntents, async ({ intent: _intent, ...profile }) => {
    await User.update(profile, { where: { id: user.id } });
    await writeAudit({ actorId: user.id, action: "user.profile_updated", entityType: "user", entityId: user.id, details: profile });
    return redirect(safeRedirectTo(new URL(request.url).searchParams.get("redirectTo")));
  });
}

export default function Welcome({ loaderData }: Route.ComponentProps) {
  const actionData = useActionData<ActionFailure>();
  const submit = useSubmit();
  const { register, handleSubmit, formState } = useForm<z.input<typeof profileSchema>, unknown, z.output<typeof profileSchema>>({
    resolver: zodResolver(profileSchema),
    defaultValues: {
      name: valueText(actionData?.values, "name") ?? loaderData.name,
      institution: valueText(actionData?.values, "institution") ?? loaderData.institution,
    },
  });
  const error = (field: "name" | "institution") => formState.errors[field]?.message ?? actionData?.errors[field];
  return (
    <div className="mx-auto max-w-md card">
      <h1>Welcome to Nightshare</h1>
      <p className="mt-1 mb-5 text-sm text-slate-600">
        Signed in as {loaderData.email}. Tell us once who you are; proposals and reviews show this.
      </p>
      <Form method="post" noValidate className="space-y-4" onSubmit={handleSubmit((_, e) => submit(e?.target as HTMLFormElement))}>
        <input type="hidden" name="intent" value="save" />
        <Field label="Your name" id="name" error={error("name")}>
          <input autoComplete="name" defaultValue={valueText(actionData?.values, "name") ?? loaderData.name} {...inputProps("name", error("name"))} {...register("name")} />
        </Field>
        <Field label="Institution" id="institution" error={error("institution")}>
          <input
            autoComplete="organization"
            defaultValue={valueText(actionData?.values, "institution") ?? loaderData.institution}
            {...inputProps("institution", error("institution"))}
            {...register("institution")}
          />
        </Field>
        <button type="submit" className="btn w-full">Continue</button>
      </Form>
    </div>
  );
}
