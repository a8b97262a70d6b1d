import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect } from "react";
import { useForm } from "react-hook-form";
import { useActionData, useFetcher } from "react-router";
import type { z } from "zod";
import { Field, inputProps } from "~/components/Field";
import { moonCategories } from "~/lib/domain";
import type { ObservationRow } from "~/lib/proposals/observations.server";
import { observationSchema } from "~/lib/schemas/proposals";
import { LiveSummary } from "./LiveSummary";
import type { ObservationActionResult, ObservationFields, ObservationPageData } from "./observation-results";
import { valueTexts } from "~/lib/forms";

type FieldName = keyof ObservationFields;

function blank(data: ObservationPageData): ObservationFields {
  const first = data.options[0];
  return {
    targetId: data.targets[0] ? String(data.targets[0].id) : "",
    instrumentId: first ? String(first.instrumentId) : "",
    filterId: first?.filters[0] ? String(first.filters.find((f) => f.band === "V")?.id ?? first.filters[0].id) : "",
    mode: "snr",
    snrGoal: "100",
    exposureSeconds: "",
    framesPerEpoch: "1",
    epochsPerSemester: "1",
    baselineYears: "",
    requiredPmPrecisionMasPerYr: "",
    moonCategory: "dark",
    maxAirmass: "1.8",
    seeingArcsec: "1.2",
  };
}

function formOf(o: ObservationRow): ObservationFields {
  const s = (v: number | null) => (v === null ? "" : String(v));
  return {
    targetId: String(o.targetId),
    instrumentId: String(o.instrumentId),
    filterId: String(o.filterId),
    mode: o.mode,
    snrGoal: s(o.snrGoal),
    exposureSeconds: s(o.exposureSeconds),
    framesPerEpoch: String(o.framesPerEpoch),
    epochsPerSemester: String(o.epochsPerSemester),
    baselineYears: s(o.baselineYears),
    requiredPmPrecisionMasPerYr: s(o.requiredPmPrecisionMasPerYr),
    moonCategory: o.moonCategory,
    maxAirmass: String(o.maxAirmass),
    seeingArcsec: String(o.seeingArcsec),
  };
}

/** Add an observation, or edit `editing`, with the live numbers beside the form. */
export function ObservationForm({ data: d, editing, onDone }: { data: ObservationPageData; editing: ObservationRow | null; onDone: () => void }) {
  const fetcher = useFetcher<ObservationActionResult>();
  const pageAnswer = useActionData<ObservationActionResult>();
  const answer = fetcher.data ?? pageAnswer;
  const result = answer && (answer.intent === "create" || answer.intent === "update") ? answer : undefined;
  const { register, handleSubmit, formState, watch, setValue, reset } = useForm<ObservationFields, unknown, z.output<typeof observationSchema>>({
    resolver: zodResolver(observationSchema),
    defaultValues: editing ? formOf(editing) : result && !result.ok ? { ...blank(d), ...valueTexts(result.values) } : blank(d),
  });
  useEffect(() => {
    if (result?.ok && fetcher.state === "idle") {
      if (!editing) reset({ ...watch(), targetId: watch("targetId") });
      onDone();
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [result, fetcher.state]);
  const values = watch();
  const instrument = d.options.find((o) => String(o.instrumentId) === values.instrumentId);
  useEffect(() => {
    if (instrument && !instrument.filters.some((f) => String(f.id) === values.filterId)) setValue("filterId", instrument.filters[0] ? String(instrument.filters[0].id) : "");
  }, [instrument, values.filterId, setValue]);
  const serverErrors = result && !result.ok ? result.errors : {};
  const error = (f: FieldName | "form") => (f !== "form" ? formState.errors[f]?.message : undefined) ?? serverErrors[f];
  const text = (name: FieldName, label: string, hint?: string) => (
    <Field label={label} id={`o-${name}`} error={error(name)} hint={hint}>
      <input inputMode="decimal" {...inputProps(`o-${name}`, error(name))} {...register(name)} />
    </Field>
  );
  const select = (name: FieldName, label: string, children: React.ReactNode) => (
    <Field label={label} id={`o-${name}`} error={error(name)}>
      <select {...(inputProps(`o-${name}`, error(name)) as object)} className="input" {...register(name)}>{children}</select>
    </Field>
  );
  const telescopes = [...new Map(d.options.map((o) => [o.telescopeId, o.telescopeName])).entries()];
  return (
    <div className="grid gap-5 lg:grid-cols-[2fr_1fr]">
      <fetcher.Form method="post" noValidate className="card space-y-4" onSubmit={handleSubmit((_, e) => fetcher.submit(e?.target as HTMLFormElement))}>
        <h2>{editing ? `Edit the observation of ${editing.targetName}` : "Add an observation"}</h2>
        <input type="hidden" name="intent" value={editing ? "update" : "create"} />
        {editing ? <input type="hidden" name="observationId" value={editing.id} /> : null}
        {error("form") ? <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800">{error("form")}</p> : null}
        <div className="grid gap-4 md:grid-cols-3">
          {select("targetId", "Target", d.targets.map((t) => <option key={t.id} value={t.id}>{t.name}</option>))}
          {select(
            "instrumentId",
            "Telescope and instrument",
            telescopes.map(([id, name]) => (
              <optgroup key={id} label={name}>
                {d.options.filter((o) => o.telescopeId === id).map((o) => <option key={o.instrumentId} value={o.instrumentId}>{o.telescopeName} · {o.instrumentName}</option>)}
              </optgroup>
            )),
          )}
          {select("filterId", "Filter", (instrument?.filters ?? []).map((f) => <option key={f.id} value={f.id}>{f.band}</option>))}
        </div>
        <fieldset className="space-y-2">
          <legend className="text-sm font-semibold text-slate-700">Per frame: an SNR goal or an exposure time</legend>
          <div className="flex gap-5">
            <label className="flex items-center gap-1.5 font-normal"><input type="radio" value="snr" {...register("mode")} /> SNR goal</label>
            <label className="flex items-center gap-1.5 font-normal"><input type="radio" value="exposure" {...register("mode")} /> Exposure time</label>
          </div>
          <div className="max-w-xs">{values.mode === "snr" ? text("snrGoal", "SNR goal per frame") : text("exposureSeconds", "Exposure time per frame (s)")}</div>
        </fieldset>
        <div className="grid gap-4 md:grid-cols-3">
          {text("framesPerEpoch", "Frames per epoch")}
          {text("epochsPerSemester", "Epochs per semester")}
          {select("moonCategory", "Moon", moonCategories.map((m) => <option key={m} value={m}>{m} time</option>))}
          {text("maxAirmass", "Airmass limit", "1.0–3.0")}
          {text("seeingArcsec", "Seeing assumed (″ FWHM)")}
        </div>
        <fieldset className="rounded-md border border-slate-200 p-3">
          <legend className="px-1 text-sm font-semibold text-slate-700">Astrometry (multi-epoch), optional</legend>
          <div className="grid gap-4 md:grid-cols-2">
            {text("baselineYears", "Baseline (years)", "time between the first and the last epoch")}
            {text("requiredPmPrecisionMasPerYr", "Required proper-motion precision (mas/yr)")}
          </div>
        </fieldset>
        <div className="flex gap-2">
          <button type="submit" className="btn" disabled={fetcher.state !== "idle"}>{editing ? "Save the observation" : "Add the observation"}</button>
          {editing ? <button type="button" className="btn-quiet" onClick={onDone}>Cancel</button> : null}
          {result?.ok ? <span role="status" className="self-center text-sm text-emerald-700">{result.message}</span> : null}
        </div>
      </fetcher.Form>
      <LiveSummary values={values} data={d} />
    </div>
  );
}
