import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import { data, Form, Link, useActionData, useNavigation, useSubmit } from "react-router";
import { useHydrated } from "~/components/ClientOnly";
import { EpochViews, PrecisionSummary } from "~/components/epochs/EpochProgressView";
import { ErrorPage } from "~/components/ErrorPage";
import { Field, inputProps } from "~/components/Field";
import { lostCauses } from "~/lib/domain";
import { astrometryProgrammes, epochProgress, recordEpoch, requireEpochOffice, telescopeChoices } from "~/lib/epochs/epochs.server";
import { epochFormSchema, formFieldOf, OBSERVED_AT_HINT } from "~/lib/epochs/schema";
import { plainIssue, readForm, Refusal } from "~/lib/forms";
import { formValues, proposalIdParam } from "~/lib/proposals/routes.server";
import { notFound } from "~/lib/proposals/proposals.server";
import type { Route } from "./+types/admin.epochs.$proposalId";

export function meta() {
  return [{ title: "Epoch log · Office · Nightshare" }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireEpochOffice(request);
  const proposalId = proposalIdParam(params);
  const programme = (await astrometryProgrammes()).find((p) => p.proposalId === proposalId);
  if (!programme) notFound();
  const [progress, telescopes] = await Promise.all([epochProgress({ proposalId, withReplan: false }), telescopeChoices()]);
  return { programme, progress, telescopes };
}

const FIELDS = ["observationId", "observedAt", "telescopeId", "frames", "fwhmArcsec", "snr", "precisionMas", "lostCause", "note"] as const;
type FormFields = Record<(typeof FIELDS)[number], string>;
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

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireEpochOffice(request);
  const proposalId = proposalIdParam(params);
  const values = formValues(await readForm(request)) as Record<string, string>;
  const parsed = epochFormSchema.safeParse(values);
  if (!parsed.success) {
    const errors: Record<string, string> = {};
    for (const issue of parsed.error.issues) errors[formFieldOf(issue.path.join(".")) || "form"] ??= issue.message;
    return data({ ok: false as const, errors, values }, { status: 400 });
  }
  try {
    const row = await recordEpoch({ user, proposalId, input: parsed.data, source: "form" });
    return { ok: true as const, message: row.lostCause ? `Lost epoch recorded (${row.lostCause}).` : `Epoch recorded: ${row.precisionMas?.toFixed(2)} mas (${row.precisionSource}).`, errors: {} as Record<string, string>, values: {} as Record<string, string> };
  } catch (error) {
    if (error instanceof Refusal) return data({ ok: false as const, errors: { [error.field === "proposalId" ? "form" : error.field]: error.message }, values }, { status: error.status });
    throw error;
  }
}

type Data = Route.ComponentProps["loaderData"];

export default function OfficeEpochLog({ loaderData }: Route.ComponentProps) {
  const { programme, progress, telescopes } = loaderData;
  const answer = useActionData<typeof action>();
  const telescopeName = (id: number) => telescopes.find((t) => t.id === id)?.name ?? `telescope ${id}`;
  return (
    <div className="space-y-4">
      <p className="text-sm"><Link to="/admin/epochs">Epoch log</Link> › {programme.code}</p>
      <h1>{programme.code} · {programme.title}</h1>
      {/* a new answer starts the form again: empty after a success, with what was typed after a refusal */}
      <RecordForm key={answer ? JSON.stringify(answer) : "fresh"} progress={progress} telescopes={telescopes} answer={answer} />
      {progress.observations.map((o) => (
        <section key={o.observationId} className="space-y-3">
          <h2>{o.targetName}</h2>
          <PrecisionSummary o={o} />
          <EpochViews progress={progress} o={o} telescopeName={telescopeName} />
        </section>
      ))}
    </div>
  );
}

function RecordForm({ progress, telescopes, answer }: { progress: Data["progress"]; telescopes: Data["telescopes"]; answer: ReturnType<typeof useActionData<typeof action>> }) {
  const busy = useNavigation().state !== "idle";
  const submit = useSubmit();
  const hydrated = useHydrated();
  const first = progress.observations[0];
  const empty: FormFields = { observationId: String(first?.observationId ?? ""), observedAt: "", telescopeId: String(first?.telescopeId ?? telescopes[0]?.id ?? ""), frames: "", fwhmArcsec: "", snr: "", precisionMas: "", lostCause: "", note: "" };
  const typed = answer && !answer.ok ? { ...empty, ...(answer.values as Partial<FormFields>) } : empty;
  const { register, handleSubmit, formState } = useForm<FormFields>({ resolver: zodResolver(epochFormSchema as never) as never, defaultValues: typed });
  const clientErrors = formState.errors as Record<string, { message?: string; cause?: { message?: string } } | undefined>;
  const clientError = (f: string) => (f === "lostCause" ? (clientErrors.lost?.cause?.message ?? clientErrors.lost?.message) : clientErrors[f]?.message);
  const raw = (f: string) => clientError(f) ?? (answer && !answer.ok ? answer.errors[f] : undefined);
  // the schema speaks the API's field ids; the form says them in words
  const err = (f: string) => {
    const m = raw(f);
    return m === undefined ? undefined : plainIssue(m.replace(/^lost\.cause\b/, "the cause"), { field: f, name: FIELD_NAMES[f] ?? f, names: FIELD_NAMES });
  };
  const input = (name: keyof FormFields, label: string, hint?: string, extra?: object) => (
    <Field label={label} id={`e-${name}`} error={err(name)} hint={hint}>
      <input {...inputProps(`e-${name}`, err(name))} {...extra} {...register(name)} />
    </Field>
  );
  return (
    <Form method="post" noValidate data-hydrated={hydrated ? "yes" : "no"} className="card space-y-4" onSubmit={handleSubmit((_, e) => submit(e?.target as HTMLFormElement))} aria-labelledby="record-title">
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

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorPage error={error} />;
}
