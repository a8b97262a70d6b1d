// The office's form for one executed or lost epoch of a programme (/admin/epochs/:proposalId).
import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import { Form, useNavigation, useSubmit } from "react-router";
import type { z } from "zod";
import { useHydrated } from "~/components/ClientOnly";
import { Field, inputProps } from "~/components/Field";
import { lostCauses } from "~/lib/domain";
import type { epochProgress, telescopeChoices } from "~/lib/epochs/epochs.server";
import { epochFormSchema, formFieldOf, OBSERVED_AT_HINT, type EpochFormFields } from "~/lib/epochs/schema";
import { plainIssue, valueTexts, type ActionFailure, type FieldErrors } from "~/lib/forms";

/** What the page's action answers. */
export type RecordEpochAnswer = ActionFailure | { ok: true; intent: "record"; message: string };

const FIELD_NAMES: Record<string, string> = {
  observationId: "Target",
  observedAt: "Observed at",
  telescopeId: "Telescope",
  frames: "Frames",
  fwhmArcsec: "FWHM",
  snr: "SNR",
  precisionMas: "Positional precision",
  lostCause: "Lost",
  note: "Note",
};

/** The server's messages by form field: the record's paths (`lost.cause`) and a refusal of the programme (`proposalId`) as the form's. */
function serverErrorsOf(answer: RecordEpochAnswer | undefined): FieldErrors {
  const out: FieldErrors = {};
  if (answer && !answer.ok) for (const [path, message] of Object.entries(answer.errors)) out[path === "proposalId" ? "form" : formFieldOf(path) || "form"] ??= message;
  return out;
}

export function RecordEpochForm({ progress, telescopes, answer }: { progress: Awaited<ReturnType<typeof epochProgress>>; telescopes: Awaited<ReturnType<typeof telescopeChoices>>; answer: RecordEpochAnswer | undefined }) {
  const busy = useNavigation().state !== "idle";
  const submit = useSubmit();
  const hydrated = useHydrated();
  const first = progress.observations[0];
  const empty: EpochFormFields = { observationId: String(first?.observationId ?? ""), observedAt: "", telescopeId: String(first?.telescopeId ?? telescopes[0]?.id ?? ""), frames: "", fwhmArcsec: "", snr: "", precisionMas: "", lostCause: "", note: "" };
  const typed = answer && !answer.ok ? { ...empty, ...valueTexts(answer.values) } : empty;
  const { register, handleSubmit, formState } = useForm<z.input<typeof epochFormSchema>, unknown, z.output<typeof epochFormSchema>>({ resolver: zodResolver(epochFormSchema), defaultValues: typed });
  // the record's schema reports a lost epoch's cause at `lost` / `lost.cause`, which is no field of the form
  const clientErrors: Record<string, { message?: string; cause?: { message?: string } } | undefined> = formState.errors;
  const clientError = (f: string) => (f === "lostCause" ? (clientErrors.lost?.cause?.message ?? clientErrors.lost?.message) : clientErrors[f]?.message);
  const serverErrors = serverErrorsOf(answer);
  const raw = (f: string) => clientError(f) ?? serverErrors[f];
  // the schema speaks the API's field ids; the form says them in words
  const err = (f: string) => {
    const m = raw(f);
    return m === undefined ? undefined : plainIssue(m.replace(/^lost\.cause\b/, "the cause"), { field: f, name: FIELD_NAMES[f] ?? f, names: FIELD_NAMES });
  };
  const input = (name: keyof EpochFormFields, label: string, hint?: string, extra?: object) => (
    <Field label={label} id={`e-${name}`} error={err(name)} hint={hint}>
      <input {...inputProps(`e-${name}`, err(name))} {...extra} {...register(name)} />
    </Field>
  );
  return (
    <Form method="post" noValidate data-hydrated={hydrated ? "yes" : "no"} className="card space-y-4" onSubmit={handleSubmit((_, e) => submit(e?.target as HTMLFormElement))} aria-labelledby="record-title">
      <input type="hidden" name="intent" value="record" />
      <h2 id="record-title">Record an epoch</h2>
      <p className="text-sm text-slate-600">
        An executed epoch needs its measured positional precision, or the FWHM and the SNR per frame it reached (the precision is then FWHM / (2.355 · SNR) / √frames, with the instrument's floor in quadrature).
        A lost epoch needs only its cause.
      </p>
      {err("form") ? <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800">{err("form")}</p> : null}
      {answer?.ok ? <p role="status" className="rounded-md border border-emerald-300 bg-emerald-50 px-3 py-2 text-sm text-emerald-900">{answer.message}</p> : null}
      <div className="grid gap-4 md:grid-cols-3">
        <Field label="Target" id="e-observationId" error={err("observationId")}>
          <select {...(inputProps("e-observationId", err("observationId")) as object)} {...register("observationId")}>
            {progress.observations.map((o) => <option key={o.observationId} value={o.observationId}>{o.targetName}</option>)}
          </select>
        </Field>
        {input("observedAt", "Observed at (UTC)", OBSERVED_AT_HINT, { spellCheck: false, placeholder: "2026-11-03T02:41" })}
        <Field label="Telescope" id="e-telescopeId" error={err("telescopeId")}>
          <select {...(inputProps("e-telescopeId", err("telescopeId")) as object)} {...register("telescopeId")}>
            {telescopes.map((t) => <option key={t.id} value={t.id}>{t.name}</option>)}
          </select>
        </Field>
        {input("frames", "Frames", undefined, { inputMode: "numeric" })}
        {input("fwhmArcsec", "Measured FWHM (″)", "optional with a measured precision", { inputMode: "decimal" })}
        {input("snr", "SNR per frame reached", "or give the precision", { inputMode: "decimal" })}
        {input("precisionMas", "Positional precision (mas)", "measured, per epoch", { inputMode: "decimal" })}
        <Field label="Lost?" id="e-lostCause" error={err("lostCause")}>
          <select {...(inputProps("e-lostCause", err("lostCause")) as object)} {...register("lostCause")}>
            <option value="">no, executed</option>
            {lostCauses.map((c) => <option key={c} value={c}>lost: {c}</option>)}
          </select>
        </Field>
        {input("note", "Note", "optional")}
      </div>
      <button type="submit" className="btn" disabled={busy}>{busy ? "Recording…" : "Record the epoch"}</button>
    </Form>
  );
}
