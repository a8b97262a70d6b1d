import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect, useMemo, useState } from "react";
import { useForm } from "react-hook-form";
import { data, Link, useActionData, useFetcher } from "react-router";
import { LiveFeasibilitySummary } from "~/components/FeasibilityParts";
import { Field, inputProps } from "~/components/Field";
import { useWorkspace } from "~/components/workspace";
import { fixed } from "~/lib/format";
import { secondsPerEpoch } from "~/lib/astro/exposure";
import { requireUser } from "~/lib/auth/auth.server";
import { moonCategories } from "~/lib/domain";
import { fieldErrors, issueLine, parseId, readForm } from "~/lib/forms";
import { createObservation, deleteObservation, listObservations, updateObservation } from "~/lib/proposals/observations.server";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { formValues, proposalIdParam, refusalResponse } from "~/lib/proposals/routes.server";
import { listTargets } from "~/lib/proposals/targets.server";
import { observationSchema } from "~/lib/schemas/proposals";
import type { Route } from "./+types/proposals.$proposalId.observations";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const { observations, options } = await listObservations({ user, proposalId });
  const targets = await listTargets({ user, proposalId });
  return { observations, options, targets: targets.map((t) => ({ id: t.id, name: t.name, magnitude: t.magnitude, band: t.band })) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await getProposalForUser({ proposalId, user }); // a stranger gets the 404 before any parsing
  const values = formValues(await readForm(request)) as Record<string, string>;
  const intent = values.intent;
  try {
    if (intent === "create" || intent === "update") {
      const parsed = observationSchema.safeParse(values);
      if (!parsed.success) return data({ ok: false as const, intent, errors: fieldErrors(parsed.error), values }, { status: 400 });
      if (intent === "create") await createObservation({ user, proposalId, input: parsed.data });
      else await updateObservation({ user, proposalId, observationId: parseId(values.observationId, "form", "observation id"), input: parsed.data });
      return { ok: true as const, intent, message: intent === "create" ? "Observation added." : "Observation saved.", errors: {} as Record<string, string>, values };
    }
    if (intent === "delete") {
      await deleteObservation({ user, proposalId, observationId: parseId(values.observationId, "form", "observation id") });
      return { ok: true as const, intent, message: "Observation deleted.", errors: {} as Record<string, string>, values };
    }
    return data({ ok: false as const, intent, errors: { form: "Unknown action." } as Record<string, string>, values }, { status: 400 });
  } catch (error) {
    const refused = refusalResponse(error, values);
    return data({ ...refused.data, intent }, { status: refused.init?.status ?? 400 });
  }
}

type Data = Route.ComponentProps["loaderData"];
type ObservationRow = Data["observations"][number];
type FormShape = Record<
  "targetId" | "instrumentId" | "filterId" | "mode" | "snrGoal" | "exposureSeconds" | "framesPerEpoch" | "epochsPerSemester" | "baselineYears" | "requiredPmPrecisionMasPerYr" | "moonCategory" | "maxAirmass" | "seeingArcsec",
  string
>;

function blank(data: Data): FormShape {
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

function formOf(o: ObservationRow): FormShape {
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

type ExposureAnswer = { exposureSeconds?: number; snr?: number; saturated?: boolean; peakPixelElectrons?: number; fullWellE?: number; regime?: string; error?: string; issues?: { path: string; message: string }[] };

/** The live numbers: the science API's exposure calculator, called as the user types (debounced). */
function LiveSummary({ values, data: d }: { values: FormShape; data: Data }) {
  const fetcher = useFetcher<ExposureAnswer>();
  const target = d.targets.find((t) => String(t.id) === values.targetId);
  const instrument = d.options.find((o) => String(o.instrumentId) === values.instrumentId);
  const filter = instrument?.filters.find((f) => String(f.id) === values.filterId);
  const num = (v: string) => (v.trim() === "" ? NaN : Number(v));
  const request = useMemo(() => {
    if (!target || !instrument || !filter) return { missing: "Choose a target, an instrument and a filter." };
    if (target.magnitude === null) return { missing: `${target.name} has no magnitude: add one on the Targets tab to see exposure times.` };
    const amount = values.mode === "snr" ? num(values.snrGoal) : num(values.exposureSeconds);
    const airmass = num(values.maxAirmass);
    const seeing = num(values.seeingArcsec);
    if (!(amount > 0) || !(airmass >= 1) || !(seeing > 0)) return { missing: "Enter the SNR goal or exposure time, the airmass limit and the seeing." };
    return {
      body: {
        band: filter.band,
        magnitude: target.magnitude,
        ...(values.mode === "snr" ? { snr: amount } : { exposureSeconds: amount }),
        airmass,
        seeingArcsec: seeing,
        moonCategory: values.moonCategory,
        telescopeId: instrument.telescopeId,
        instrumentId: instrument.instrumentId,
      },
    };
  }, [target, instrument, filter, values.mode, values.snrGoal, values.exposureSeconds, values.maxAirmass, values.seeingArcsec, values.moonCategory]);
  const key = JSON.stringify(request);
  useEffect(() => {
    if (!("body" in request)) return;
    const timer = setTimeout(() => fetcher.submit(request.body as never, { method: "post", action: "/api/v1/exposure", encType: "application/json" }), 300);
    return () => clearTimeout(timer);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key]);
  const answer = fetcher.data;
  const frames = Number(values.framesPerEpoch) || 0;
  const epochs = Number(values.epochsPerSemester) || 0;
  const perEpoch = answer?.exposureSeconds !== undefined && instrument ? secondsPerEpoch(frames, answer.exposureSeconds, instrument) : null;
  const stale = fetcher.state !== "idle";
  return (
    <aside aria-labelledby="live-title" aria-live="polite" className="card space-y-2 bg-night-50">
      <h2 id="live-title">Live numbers</h2>
      {"missing" in request ? (
        <p className="text-sm text-slate-600">{request.missing}</p>
      ) : answer?.error ? (
        <p role="alert" className="text-sm text-red-800">{answer.issues?.length ? answer.issues.map((i) => issueLine(i.path, i.message)).join("; ") : answer.error}</p>
      ) : answer?.exposureSeconds !== undefined ? (
        <dl className={`grid grid-cols-2 gap-x-4 gap-y-1 text-sm ${stale ? "opacity-60" : ""}`}>
          <dt className="text-slate-600">Exposure per frame</dt>
          <dd data-testid="live-exposure" className="text-right font-semibold tabular-nums">{fixed(answer.exposureSeconds, 1)} s</dd>
          <dt className="text-slate-600">SNR per frame</dt>
          <dd data-testid="live-snr" className="text-right font-semibold tabular-nums">{fixed(answer.snr, 1)}</dd>
          <dt className="text-slate-600">Limited by</dt>
          <dd className="text-right">{answer.regime?.replace(/-/g, " ")}</dd>
          <dt className="text-slate-600">Time per epoch</dt>
          <dd className="text-right tabular-nums">{perEpoch !== null ? `${fixed(perEpoch / 60, 1)} min` : "—"}</dd>
          <dt className="text-slate-600">Per semester ({epochs} epoch{epochs === 1 ? "" : "s"})</dt>
          <dd data-testid="live-hours" className="text-right tabular-nums">{perEpoch !== null ? `${fixed((perEpoch * epochs) / 3600, 2)} h` : "—"}</dd>
          {answer.saturated ? <dd className="col-span-2 font-semibold text-red-800">Saturates: peak {Math.round(answer.peakPixelElectrons ?? 0)} e⁻ ≥ full well {answer.fullWellE} e⁻. Shorten the frames and take more of them.</dd> : null}
        </dl>
      ) : (
        <p className="text-sm text-slate-600">Computing…</p>
      )}
      <p className="text-xs text-slate-500">
        CCD equation at the airmass limit (the worst case), with the {values.moonCategory} sky of the {filter?.band ?? "chosen"} filter
        {target?.band && filter && target.band !== filter.band ? `; the ${target.band} magnitude is used as is in ${filter.band}` : ""}. Time per epoch = frames × (exposure + readout) + acquisition. The
        feasibility sheet adds visibility and the astrometric plan.
      </p>
    </aside>
  );
}

function ObservationForm({ data: d, editing, onDone }: { data: Data; editing: ObservationRow | null; onDone: () => void }) {
  const fetcher = useFetcher<typeof action>();
  const pageAnswer = useActionData<typeof action>();
  const answer = fetcher.data ?? pageAnswer;
  const result = answer && (answer.intent === "create" || answer.intent === "update") ? answer : undefined;
  const { register, handleSubmit, formState, watch, setValue, reset } = useForm<FormShape>({
    resolver: zodResolver(observationSchema) as never,
    defaultValues: editing ? formOf(editing) : result && !result.ok ? { ...blank(d), ...(result.values as Partial<FormShape>) } : blank(d),
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
  const error = (f: keyof FormShape | "form") => (f !== "form" ? formState.errors[f]?.message : undefined) ?? serverErrors[f];
  const text = (name: keyof FormShape, label: string, hint?: string) => (
    <Field label={label} id={`o-${name}`} error={error(name)} hint={hint}>
      <input inputMode="decimal" {...inputProps(`o-${name}`, error(name))} {...register(name)} />
    </Field>
  );
  const select = (name: keyof FormShape, label: string, children: React.ReactNode) => (
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

function DeleteButton({ o }: { o: ObservationRow }) {
  const fetcher = useFetcher<typeof action>();
  const error = fetcher.data && !fetcher.data.ok ? Object.values(fetcher.data.errors)[0] : null;
  return (
    <fetcher.Form method="post" className="inline" onSubmit={(e) => { if (!confirm(`Delete this observation of ${o.targetName}?`)) e.preventDefault(); }}>
      <input type="hidden" name="intent" value="delete" />
      <input type="hidden" name="observationId" value={o.id} />
      <button type="submit" className="btn-quiet">Delete</button>
      {error ? <span role="alert" className="ml-1 text-xs text-red-700">{error}</span> : null}
    </fetcher.Form>
  );
}

export default function Observations({ loaderData }: Route.ComponentProps) {
  const workspace = useWorkspace();
  const [editing, setEditing] = useState<ObservationRow | null>(null);
  const { observations, targets, options } = loaderData;
  const without = targets.filter((t) => !observations.some((o) => o.targetId === t.id));
  return (
    <div className="space-y-5">
      {targets.length === 0 ? (
        <p className="card">Add targets first, on the <Link to="../targets" relative="path">Targets</Link> tab.</p>
      ) : null}
      {options.length === 0 ? <p role="alert" className="card text-red-800">This call offers no telescope with an instrument yet; ask the observatory office.</p> : null}
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="table-base">
          <thead>
            <tr>
              <th>Target</th><th>Instrument</th><th>Filter</th><th className="text-right">Per frame</th><th className="text-right">Frames</th><th className="text-right">Epochs / sem.</th>
              <th className="text-right">Baseline</th><th className="text-right">σμ goal</th><th>Moon</th><th className="text-right">Airmass ≤</th><th className="text-right">Seeing</th>
              {workspace.editable ? <th /> : null}
            </tr>
          </thead>
          <tbody>
            {observations.map((o) => (
              <tr key={o.id} className={editing?.id === o.id ? "bg-dusk-100/60" : "hover:bg-night-50"}>
                <td className="font-semibold">{o.targetName}</td>
                <td>{o.instrumentName}</td>
                <td>{o.band}</td>
                <td className="text-right tabular-nums whitespace-nowrap">{o.mode === "snr" ? `SNR ${o.snrGoal}` : `${o.exposureSeconds} s`}</td>
                <td className="text-right tabular-nums">{o.framesPerEpoch}</td>
                <td className="text-right tabular-nums">{o.epochsPerSemester}</td>
                <td className="text-right tabular-nums">{o.baselineYears !== null ? `${o.baselineYears} yr` : "—"}</td>
                <td className="text-right tabular-nums">{o.requiredPmPrecisionMasPerYr !== null ? `${o.requiredPmPrecisionMasPerYr} mas/yr` : "—"}</td>
                <td>{o.moonCategory}</td>
                <td className="text-right tabular-nums">{o.maxAirmass}</td>
                <td className="text-right tabular-nums">{o.seeingArcsec}″</td>
                {workspace.editable ? (
                  <td className="whitespace-nowrap">
                    <button type="button" className="btn-quiet mr-1" onClick={() => setEditing(o)}>Edit</button>
                    <DeleteButton o={o} />
                  </td>
                ) : null}
              </tr>
            ))}
            {observations.length === 0 ? <tr><td colSpan={12} className="py-6 text-center text-slate-500">No observations yet.</td></tr> : null}
          </tbody>
        </table>
      </div>
      {without.length && targets.length ? (
        <p className="text-sm text-amber-800">Without an observation yet: {without.map((t) => t.name).join(", ")}.</p>
      ) : null}
      {workspace.editable && targets.length && options.length ? (
        <ObservationForm key={editing?.id ?? "new"} data={loaderData} editing={editing} onDone={() => setEditing(null)} />
      ) : null}
      {/* Recomputed from the API after every save (the loader's data changes), without a page reload. */}
      {observations.length ? (
        <div className="card">
          <LiveFeasibilitySummary proposalId={workspace.id} revision={observations} />
        </div>
      ) : null}
    </div>
  );
}
