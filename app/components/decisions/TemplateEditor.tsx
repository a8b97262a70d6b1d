import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect } from "react";
import { useForm } from "react-hook-form";
import { useFetcher } from "react-router";
import { Field, inputProps } from "~/components/Field";
import { composeLetter, PLACEHOLDERS, placeholderNames } from "~/lib/decisions/template";
import { outcomeLabels, type DecisionOutcome, type LetterFacts } from "~/lib/decisions/vocabulary";
import { templateSchema, type DecisionsAnswer } from "~/lib/schemas/decisions";
import { valueText } from "~/lib/forms";

/** One outcome's template, checked as it is typed, with the letter it makes for a sample proposal. */
export function TemplateEditor({ outcome, initial, sample }: { outcome: DecisionOutcome; initial: { subject: string; body: string; custom: boolean }; sample: LetterFacts | null }) {
  const fetcher = useFetcher<DecisionsAnswer>();
  const data = fetcher.data;
  const answer = data && (data.ok ? data.intent === "save-template" && data.outcome === outcome : valueText(data.values, "outcome") === outcome) ? data : undefined;
  const { register, handleSubmit, formState, watch, setError } = useForm({
    resolver: zodResolver(templateSchema),
    mode: "onChange",
    defaultValues: { outcome, subject: initial.subject, body: initial.body },
  });
  useEffect(() => {
    if (answer && !answer.ok) for (const [field, message] of Object.entries(answer.errors)) if (field === "subject" || field === "body") setError(field, { message });
  }, [answer, setError]);
  const subject = watch("subject");
  const body = watch("body");
  const preview = sample && templateSchema.safeParse({ outcome, subject, body }).success ? composeLetter({ subject, body }, { ...sample, outcome }) : null;
  const id = (f: string) => `template-${outcome}-${f}`;
  const err = (f: "subject" | "body") => formState.errors[f]?.message ?? (answer && !answer.ok ? answer.errors[f] : undefined);
  return (
    <fetcher.Form method="post" noValidate className="card space-y-3" onSubmit={handleSubmit((_, e) => fetcher.submit(e?.target as HTMLFormElement))} aria-label={`${outcomeLabels[outcome]} letter template`}>
      <h3 className="text-base font-semibold">{outcomeLabels[outcome]} letter {initial.custom ? null : <span className="text-sm font-normal text-slate-500">(the default wording)</span>}</h3>
      <input type="hidden" name="intent" value="save-template" />
      <input type="hidden" {...register("outcome")} />
      <Field label="Subject" id={id("subject")} error={err("subject")}>
        <input {...inputProps(id("subject"), err("subject"))} {...register("subject")} />
      </Field>
      <Field label="Letter" id={id("body")} error={err("body")} hint={<>Placeholders: {placeholderNames.map((n) => <code key={n} title={PLACEHOLDERS[n]} className="mr-1">[[{n}]]</code>)}</>}>
        <textarea rows={12} id={id("body")} className="input font-mono text-sm" aria-invalid={err("body") ? true : undefined} aria-describedby={err("body") ? `${id("body")}-error` : undefined} {...register("body")} />
      </Field>
      <div className="flex items-center gap-3">
        <button type="submit" className="btn" disabled={fetcher.state !== "idle"}>{fetcher.state !== "idle" ? "Saving…" : "Save the template"}</button>
        {answer?.ok ? <span role="status" className="text-sm text-emerald-700">{answer.message}</span> : null}
        {answer && !answer.ok && answer.errors.form ? <span role="alert" className="text-sm text-red-700">{answer.errors.form}</span> : null}
      </div>
      {preview ? (
        <details className="rounded border border-slate-200 bg-slate-50 p-3" open>
          <summary className="cursor-pointer text-sm font-semibold">Preview for {sample!.code} ({sample!.outcome === outcome ? "its own outcome" : `shown as ${outcome}`})</summary>
          <p className="mt-2 text-sm font-semibold">{preview.subject}</p>
          <pre className="mt-1 whitespace-pre-wrap font-sans text-sm">{preview.body}</pre>
        </details>
      ) : null}
    </fetcher.Form>
  );
}
