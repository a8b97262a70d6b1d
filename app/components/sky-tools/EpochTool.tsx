import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect, useState } from "react";
import { useForm, type Resolver } from "react-hook-form";
import { useFetcher } from "react-router";
import { CartesianGrid, ComposedChart, Line, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from "recharts";
import { Field, inputProps } from "~/components/Field";
import type { FitPrecision, Plan } from "~/lib/astro/astrometry";
import { epochPlanBodySchema, type EpochPlanBody } from "~/lib/astro/schemas";
import { fmt, isApiError, useLiveForm, useServerIssues } from "./live";

export type EpochForm = {
  site: { latitudeDeg: string; longitudeDeg: string; elevationM: string; timeZone: string };
  target: { ra: string; dec: string };
  firstDate: string;
  baselineYears: string;
  goal: "epochs" | "pm" | "velocity";
  epochs: string;
  requiredProperMotionMasPerYr: string;
  requiredTangentialVelocityKmS: string;
  distancePc: string;
  perEpochPrecisionMas: string;
  maxAirmass: string;
  secondsPerEpoch: string;
};

export type EpochAnswer = Plan & { perEpochPrecisionMas: number; movedPrecision?: FitPrecision };

const FIELDS = [
  "site.latitudeDeg", "site.longitudeDeg", "site.elevationM", "site.timeZone", "target.ra", "target.dec", "firstDate",
  "baselineYears", "epochs", "requiredProperMotionMasPerYr", "requiredTangentialVelocityKmS", "distancePc",
  "perEpochPrecisionMas", "maxAirmass", "secondsPerEpoch",
] as const;
type FieldName = (typeof FIELDS)[number];

function payload(raw: EpochForm, moved: string[] | null) {
  const { goal, ...body } = raw;
  return {
    ...body,
    epochs: goal === "epochs" ? body.epochs : "",
    requiredProperMotionMasPerYr: goal === "pm" ? body.requiredProperMotionMasPerYr : "",
    requiredTangentialVelocityKmS: goal === "velocity" ? body.requiredTangentialVelocityKmS : "",
    distancePc: goal === "velocity" ? body.distancePc : "",
    ...(moved ? { movedEpochs: moved } : {}),
  };
}

export function EpochTool({ defaults, initial }: { defaults: EpochForm; initial: EpochAnswer }) {
  const fetcher = useFetcher<EpochAnswer>();
  const [moved, setMoved] = useState<string[] | null>(null);
  const form = useForm<EpochForm, unknown, EpochPlanBody>({
    resolver: zodResolver(epochPlanBodySchema) as unknown as Resolver<EpochForm, unknown, EpochPlanBody>,
    defaultValues: defaults,
    mode: "onChange",
  });
  const goal = form.watch("goal");
  useLiveForm(form, () => {
    setMoved(null);
    fetcher.submit(payload(form.getValues(), null), { method: "post", action: "/api/v1/epoch-plan", encType: "application/json" });
  });
  useServerIssues(form, fetcher.data, FIELDS);
  const [plan, setPlan] = useState<EpochAnswer>(initial);
  useEffect(() => {
    if (fetcher.data && !isApiError(fetcher.data)) setPlan(fetcher.data);
  }, [fetcher.data]);
  const moveEpoch = (i: number, date: string) => {
    const next = (moved ?? plan.epochs.map((e) => e.date)).slice();
    next[i] = date;
    setMoved(next);
    if (next.every((d) => /^\d{4}-\d{2}-\d{2}$/.test(d))) {
      fetcher.submit(payload(form.getValues(), next), { method: "post", action: "/api/v1/epoch-plan", encType: "application/json" });
    }
  };
  const errors = form.formState.errors as Record<string, unknown>;
  const err = (k: FieldName): string | undefined => {
    const [a, b] = k.split(".");
    const e = errors[a] as Record<string, { message?: string }> & { message?: string };
    return (b ? e?.[b]?.message : e?.message) as string | undefined;
  };
  const input = (k: FieldName) => ({ ...inputProps(`ep-${k}`, err(k)), ...form.register(k) });
  const p = plan.precision;
  const movedP = plan.movedPrecision;
  const curve = plan.parallaxCurve.map((c) => ({ t: Date.parse(c.date), ra: c.ra, dec: c.dec }));
  const points = plan.epochs.map((e) => ({ t: Date.parse(e.time), ra: e.parallaxFactors.ra, dec: e.parallaxFactors.dec }));
  const year = (t: number) => new Date(t).toISOString().slice(0, 7);

  return (
    <section className="card space-y-6" aria-labelledby="ep-title">
      <div>
        <h2 id="ep-title">Astrometric epochs</h2>
        <p className="text-sm text-slate-600">
          Epochs placed on nights when the target is above the limit in the dark, spread over the baseline and towards the parallax-factor extremes;
          precision from the covariance of the five-parameter least-squares fit (position, proper motion, parallax). Tangential velocity v = 4.74047 μ d.
          Move an epoch in the table to see the precision change.
        </p>
      </div>
      <form className="grid grid-cols-2 gap-4 md:grid-cols-4 lg:grid-cols-6" noValidate onSubmit={(e) => e.preventDefault()}>
        <Field label="Latitude (°)" id="ep-site.latitudeDeg" error={err("site.latitudeDeg")}><input inputMode="decimal" {...input("site.latitudeDeg")} /></Field>
        <Field label="Longitude (°, E +)" id="ep-site.longitudeDeg" error={err("site.longitudeDeg")}><input inputMode="decimal" {...input("site.longitudeDeg")} /></Field>
        <Field label="Elevation (m)" id="ep-site.elevationM" error={err("site.elevationM")}><input inputMode="decimal" {...input("site.elevationM")} /></Field>
        <Field label="Time zone" id="ep-site.timeZone" error={err("site.timeZone")}><input {...input("site.timeZone")} /></Field>
        <Field label="RA (J2000)" id="ep-target.ra" error={err("target.ra")}><input {...input("target.ra")} /></Field>
        <Field label="Dec (J2000)" id="ep-target.dec" error={err("target.dec")}><input {...input("target.dec")} /></Field>
        <Field label="First date" id="ep-firstDate" error={err("firstDate")}><input type="date" {...input("firstDate")} /></Field>
        <Field label="Baseline (years)" id="ep-baselineYears" error={err("baselineYears")}><input inputMode="decimal" {...input("baselineYears")} /></Field>
        <Field label="Plan by" id="ep-goal">
          <select id="ep-goal" className="input" {...form.register("goal")}>
            <option value="epochs">epoch count</option>
            <option value="pm">σ(μ) required</option>
            <option value="velocity">σ(v) at a distance</option>
          </select>
        </Field>
        {goal === "epochs" ? <Field label="Epochs (3–60)" id="ep-epochs" error={err("epochs")}><input inputMode="numeric" {...input("epochs")} /></Field> : null}
        {goal === "pm" ? <Field label="σ(μ) required (mas/yr)" id="ep-requiredProperMotionMasPerYr" error={err("requiredProperMotionMasPerYr")}><input inputMode="decimal" {...input("requiredProperMotionMasPerYr")} /></Field> : null}
        {goal === "velocity" ? (
          <>
            <Field label="σ(v) required (km/s)" id="ep-requiredTangentialVelocityKmS" error={err("requiredTangentialVelocityKmS")}><input inputMode="decimal" {...input("requiredTangentialVelocityKmS")} /></Field>
            <Field label="Distance (pc)" id="ep-distancePc" error={err("distancePc")}><input inputMode="decimal" {...input("distancePc")} /></Field>
          </>
        ) : null}
        <Field label="Per-epoch σ (mas)" id="ep-perEpochPrecisionMas" error={err("perEpochPrecisionMas")} hint="per coordinate"><input inputMode="decimal" {...input("perEpochPrecisionMas")} /></Field>
        <Field label="Max air mass" id="ep-maxAirmass" error={err("maxAirmass")}><input inputMode="decimal" {...input("maxAirmass")} /></Field>
        <Field label="Seconds per epoch" id="ep-secondsPerEpoch" error={err("secondsPerEpoch")} hint="exposures + overheads"><input inputMode="numeric" {...input("secondsPerEpoch")} /></Field>
      </form>

      {plan.message ? <p className="rounded bg-dusk-100 px-3 py-2 text-sm">{plan.message}</p> : null}
      <dl className="grid grid-cols-2 gap-3 text-sm md:grid-cols-5">
        {[
          ["σ(μα*)", `${fmt(p.properMotionPrecisionMasPerYr.ra, 3)} mas/yr`],
          ["σ(μδ)", `${fmt(p.properMotionPrecisionMasPerYr.dec, 3)} mas/yr`],
          ["σ(ϖ)", `${fmt(p.parallaxPrecisionMas, 3)} mas`],
          ["Required σ(μ)", plan.requiredProperMotionMasPerYr === null ? "—" : `${fmt(plan.requiredProperMotionMasPerYr, 3)} mas/yr`],
          ["Requirement", plan.met === null ? "none given" : plan.met ? "met" : "not met"],
        ].map(([k, v]) => (
          <div key={k} className="rounded-md bg-night-50 px-3 py-2">
            <dt className="text-xs text-slate-500">{k}</dt>
            <dd className={`font-semibold ${v === "not met" ? "text-red-700" : "text-night-900"}`}>{v}</dd>
          </div>
        ))}
      </dl>
      {movedP ? (
        <p className="rounded border border-dusk-400 bg-dusk-100 px-3 py-2 text-sm" role="status">
          With your moved epochs: σ(μα*) {fmt(movedP.properMotionPrecisionMasPerYr.ra, 3)}, σ(μδ) {fmt(movedP.properMotionPrecisionMasPerYr.dec, 3)} mas/yr, σ(ϖ){" "}
          {fmt(movedP.parallaxPrecisionMas, 3)} mas {movedP.determined ? "" : "(these dates cannot separate the parameters)"}.{" "}
          <button type="button" className="btn-quiet" onClick={() => { setMoved(null); fetcher.submit(payload(form.getValues(), null), { method: "post", action: "/api/v1/epoch-plan", encType: "application/json" }); }}>
            Back to the plan
          </button>
        </p>
      ) : null}

      <figure className="space-y-2">
        <figcaption className="text-sm font-semibold text-night-900">Parallax factors over the baseline (lines) and the planned epochs (dots)</figcaption>
        <div className="h-64 w-full">
          <ResponsiveContainer width="100%" height="100%">
            <ComposedChart margin={{ top: 8, right: 16, bottom: 8, left: 0 }}>
              <CartesianGrid stroke="#e2e8f0" />
              <XAxis dataKey="t" type="number" scale="time" domain={["dataMin", "dataMax"]} tickFormatter={year} />
              <YAxis domain={[-1.1, 1.1]} ticks={[-1, -0.5, 0, 0.5, 1]} />
              <Tooltip labelFormatter={(t) => new Date(Number(t)).toISOString().slice(0, 10)} formatter={(v) => fmt(Number(v), 3)} />
              <Line data={curve} dataKey="ra" name="f(α*)" stroke="#1e3a5f" dot={false} strokeWidth={2} isAnimationActive={false} />
              <Line data={curve} dataKey="dec" name="f(δ)" stroke="#d98e2b" dot={false} strokeWidth={2} isAnimationActive={false} />
              <Scatter data={points} dataKey="ra" name="epoch f(α*)" fill="#1e3a5f" isAnimationActive={false} />
              <Scatter data={points} dataKey="dec" name="epoch f(δ)" fill="#d98e2b" isAnimationActive={false} />
            </ComposedChart>
          </ResponsiveContainer>
        </div>
        <p className="text-xs text-slate-500"><span className="font-semibold text-night-800">━ f(α*)</span> · <span className="font-semibold text-dusk-500">━ f(δ)</span> (in units of the parallax); {plan.candidates} usable nights in the baseline.</p>
      </figure>

      <div className="grid gap-6 md:grid-cols-3">
        <div className="md:col-span-2 max-h-96 overflow-auto rounded border border-slate-200">
          <table className="table-base">
            <thead className="sticky top-0"><tr><th>#</th><th>Night of (move it)</th><th>Mid-window UTC</th><th>f(α*)</th><th>f(δ)</th><th>Hours up</th><th>Semester</th></tr></thead>
            <tbody>
              {plan.epochs.map((e, i) => (
                <tr key={`${i}-${e.date}`}>
                  <td>{i + 1}</td>
                  <td>
                    <input type="date" aria-label={`Epoch ${i + 1} date`} className="input mt-0 py-1" value={moved?.[i] ?? e.date} onChange={(ev) => moveEpoch(i, ev.target.value)} />
                  </td>
                  <td>{e.time.slice(0, 16).replace("T", " ")}</td>
                  <td>{fmt(e.parallaxFactors.ra, 3)}</td>
                  <td>{fmt(e.parallaxFactors.dec, 3)}</td>
                  <td>{fmt(e.altitudeWindowHours, 1)}</td>
                  <td>{e.semester}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <table className="table-base self-start">
          <thead><tr><th>Semester</th><th>Epochs</th><th>Hours</th></tr></thead>
          <tbody>
            {plan.perSemester.map((s) => (
              <tr key={s.semester}><td>{s.semester}</td><td>{s.epochs}</td><td>{fmt(s.hours, 2)}</td></tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}
