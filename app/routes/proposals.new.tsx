import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import { Form, Link, redirect, useActionData, useNavigation, useSubmit } from "react-router";
import { z } from "zod";
import { AbstractField } from "~/components/AbstractField";
import { Field, inputProps } from "~/components/Field";
import { formatUtc as utc } from "~/lib/format";
import { requireUser } from "~/lib/auth/auth.server";
import { formAction, intent } from "~/lib/actions.server";
import { valueText, type ActionFailure } from "~/lib/forms";
import { createProposal, openCalls } from "~/lib/proposals/proposals.server";
import { newProposalSchema } from "~/lib/schemas/proposals";
import type { Route } from "./+types/proposals.new";

export function meta() {
  return [{ title: "Start a proposal · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request);
  const calls = await openCalls();
  const wanted = new URL(request.url).searchParams.get("call");
  const preselected = calls.find((c) => c.semesterCode === wanted)?.id ?? (calls.length === 1 ? calls[0].id : null);
  return { calls, preselected, unknownCall: wanted && !calls.some((c) => c.semesterCode === wanted) ? wanted : null };
}

const newProposalIntents = z.discriminatedUnion("intent", [intent("create", newProposalSchema)]);

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  return formAction(request, newProposalIntents, async ({ intent: _intent, ...input }) => {
    const proposal = await createProposal({ user, ...input });
    return redirect(`/proposals/${proposal.id}`);
  });
}

export default function NewProposal({ loaderData }: Route.ComponentProps) {
  const { calls, preselected, unknownCall } = loaderData;
  const actionData = useActionData<ActionFailure>();
  const navigation = useNavigation();
  const submit = useSubmit();
  const { register, handleSubmit, formState, watch } = useForm<z.input<typeof newProposalSchema>, unknown, z.output<typeof newProposalSchema>>({
    resolver: zodResolver(newProposalSchema),
    defaultValues: {
      callId: valueText(actionData?.values, "callId") ?? (preselected ? String(preselected) : ""),
      title: valueText(actionData?.values, "title") ?? "",
      abstract: valueText(actionData?.values, "abstract") ?? "",
    },
  });
  const error = (field: "callId" | "title" | "abstract") => formState.errors[field]?.message ?? actionData?.errors[field];
  if (calls.length === 0) {
    return (
      <div className="mx-auto max-w-2xl card">
        <h1>Start a proposal</h1>
        <p className="mt-2 text-slate-700">No call for proposals is open at the moment, so a new proposal cannot be started. <Link to="/proposals">Back to my proposals</Link>.</p>
      </div>
    );
  }
  return (
    <div className="mx-auto max-w-3xl card">
      <h1>Start a proposal</h1>
      <p className="mt-1 mb-5 text-sm text-slate-600">You become its PI. Everything else (team, targets, observations, science case) is added in the proposal's workspace, and the draft is saved as you go.</p>
      {unknownCall ? <p role="alert" className="mb-4 rounded-md border border-amber-300 bg-amber-50 px-3 py-2 text-sm text-amber-900">Call {unknownCall} is not open; choose one of the open calls.</p> : null}
      {actionData?.errors.form ? <p role="alert" className="mb-4 rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800">{actionData.errors.form}</p> : null}
      <Form method="post" noValidate className="space-y-5" onSubmit={handleSubmit((_, e) => submit(e?.target as HTMLFormElement))}>
        <input type="hidden" name="intent" value="create" />
        <fieldset>
          <legend className="text-sm font-semibold text-slate-700">Call for proposals</legend>
          <div className="mt-2 grid gap-3 sm:grid-cols-2">
            {calls.map((c) => (
              <label key={c.id} className="flex cursor-pointer items-start gap-3 rounded-md border border-slate-300 bg-white p-3 font-normal has-[:checked]:border-night-700 has-[:checked]:bg-night-50">
                <input type="radio" value={String(c.id)} className="mt-1" defaultChecked={String(c.id) === String(valueText(actionData?.values, "callId") ?? preselected ?? "")} {...register("callId")} aria-invalid={error("callId") ? true : undefined} />
                <span>
                  <span className="block font-semibold text-night-900">{c.semesterCode}</span>
                  <span className="block text-sm text-slate-600">{c.title}</span>
                  <span className="block text-sm text-slate-600">Deadline {utc(c.deadlineAt)} · science case up to {c.pageLimit} pages</span>
                </span>
              </label>
            ))}
          </div>
          {error("callId") ? <p className="field-error" role="alert">{error("callId")}</p> : null}
        </fieldset>
        <Field label="Title" id="title" error={error("title")}>
          <input {...inputProps("title", error("title"))} {...register("title")} />
        </Field>
        <AbstractField value={watch("abstract") ?? ""} error={error("abstract")} registration={register("abstract")} />
        <div className="flex gap-3">
          <button type="submit" className="btn" disabled={navigation.state === "submitting"}>
            {navigation.state === "submitting" ? "Creating…" : "Create the draft"}
          </button>
          <Link to="/proposals" className="btn-quiet">Cancel</Link>
        </div>
      </Form>
    </div>
  );
}
