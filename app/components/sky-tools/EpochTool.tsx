import { lazy, useEffect, useState } from "react";
import { useForm } from "react-hook-form";
import { ChartPlaceholder, ClientOnly } from "~/components/ClientOnly";
import { Field, inputProps } from "~/components/Field";
import type { FitPrecision, Plan } from "~/lib/astro/astrometry";
import { plainIssue } from "~/lib/forms";
import { LiveStatusLine, TelescopePicker } from "./LiveStatus";
import { compact, isoDateInput, issuesByField, useLiveApi, type SkyTelescope } from "./live";
import { grouped as fmt } from "~/lib/format";

const ParallaxChartLazy = lazy(() => import("./EpochCharts").then((m) => ({ default: m.ParallaxChart })));

export type EpochForm = {
  /** a telescope id (its site), or "custom" for the site fields */
  telescopeId: string;
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

const NAMES = {
  telescopeId: "Telescope",
  "site.latitudeDeg": "Latitude",
  "site.longitudeDeg": "Longitude",
  "site.elevationM": "Elevation",
  "site.timeZone": "Time zone",
  "target.ra": "RA",
  "target.dec": "Dec",
  firstDate: "First date",
  baselineYears: "Baseline",
  epochs: "Epochs",
  requiredProperMotionMasPerYr: "Required σ(μ)",
  requiredTangentialVelocityKmS: "Required σ(v)",
  distancePc: "Distance",
  perEpochPrecisionMas: "Per-epoch σ",
  maxAirmass: "Max air mass",
  secondsPerEpoch: "Seconds per epoch",
} as const;
type FieldName = keyof typeof NAMES;
const SITE_FIELDS = ["site.latitudeDeg", "site.longitudeDeg", "site.elevationM", "site.timeZone"] as const;

/** The API body for the form's values (and the moved epoch dates, if any). */
export function epochRequest(raw: EpochForm, moved: string[] | null) {
  const { goal, telescopeId, site, ...body } = raw;
  return {
    method: "POST" as const,
    url: "/api/v1/epoch-plan",
    body: compact({
      ...body,
      ...(telescopeId === "custom" ? { site } : { telescopeId }),
      epochs: goal === "epochs" ? body.epochs : "",
      requiredProperMotionMasPerYr: goal === "pm" ? body.requiredProperMotionMasPerYr : "",
      requiredTangentialVelocityKmS: goal === "velocity" ? body.requiredTangentialVelocityKmS : "",
      distancePc: goal === "velocity" ? body.distancePc : "",
      ...(moved ? { movedEpochs: moved } : {}),
    }),
  };
}

export function EpochTool({ defaults, initial, telescopes }: { defaults: EpochForm; initial: EpochAnswer; telescopes: SkyTelescope[] }) {
  const form = useForm<EpochForm>({ defaultValues: defaults });
  const [moved, setMoved] = useState<string[] | null>(null);
  // a change of the form is a new plan: the moved dates belonged to the old one
  useEffect(() => {
    const sub = form.watch(() => setMoved(null));
    return () => sub.unsubscribe();
  }, [form]);
  const values = form.watch();
  const goal = values.goal;
  const live = useLiveApi<EpochAnswer>(epochRequest(values, moved), initial);
  const movedIssues = live.issues.filter((i) => i.path.startsWith("movedEpochs"));
  const { byField, other } = issuesByField(
    live.issues.filter((i) => !i.path.startsWith("movedEpochs")),
    NAMES,
    (p) => (p === "site" ? "telescopeId" : p),
  );
  const plan = live.result;
  const custom = values.telescopeId === "custom";
  const err = (k: FieldName): string | undefined => byField[k];
  const input = (k: FieldName) => ({ ...inputProps(`ep-${k}`, err(k)), ...form.register(k) });
  const site = (k: (typeof SITE_FIELDS)[number]) => ({ ...input(k), readOnly: !custom, className: custom ? "input" : "input bg-slate-100 text-slate-600" });
  const pick = (id: string) => {
    const t = telescopes.find((x) => String(x.id) === id);
    form.setValue("telescopeId", id);
    if (t) {
      form.setValue("site.latitudeDeg", String(t.latitudeDeg));
      form.setValue("site.longitudeDeg", String(t.longitudeDeg));
      form.setValue("site.elevationM", String(t.elevationM));
      form.setValue("site.timeZone", t.timeZone);
    }
  };
  const moveEpoch = (i: number, date: string) => {
    const next = (moved ?? plan.epochs.map((e) => e.date)).slice();
    next[i] = date;
    setMoved(next);
  };
  const movedError = (i: number) => {
    const issue = movedIssues.find((x) => x.path === `movedEpochs.${i}`) ?? (i === 0 ? movedIssues.find((x) => x.path === "movedEpochs") : undefined);
    return issue ? plainIssue(issue.message, { field: `movedEpochs.${i}`, name: `Epoch ${i + 1}` }) : undefined;
  };
  const p = plan.precision;
  const movedP = plan.movedPrecision;

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
      <form className="grid grid-cols-1 gap-4 sm:grid-cols-2 md:grid-cols-4 lg:grid-cols-6" noValidate onSubmit={(e) => e.preventDefault()}>
        <TelescopePicker id="ep-telescopeId" value={values.telescopeId} onChange={pick} telescopes={telescopes} error={err("telescopeId")} />
        <Field label="Latitude (°)" id="ep-site.latitudeDeg" error={err("site.latitudeDeg")}><input inputMode="decimal" {...site("site.latitudeDeg")} /></Field>
        <Field label="Longitude (°, E +)" id="ep-site.longitudeDeg" error={err("site.longitudeDeg")}><input inputMode="decimal" {...site("site.longitudeDeg")} /></Field>
        <Field label="Elevation (m)" id="ep-site.elevationM" error={err("site.elevationM")}><input inputMode="decimal" {...site("site.elevationM")} /></Field>
        <Field label="Time zone" id="ep-site.timeZone" error={err("site.timeZone")}><input {...site("site.timeZone")} /></Field>
        <Field label="RA (J2000)" id="ep-target.ra" error={err("target.ra")}><input {...input("target.ra")} /></Field>
        <Field label="Dec (J2000)" id="ep-target.dec" error={err("target.dec")}><input {...input("target.dec")} /></Field>
        <Field label="First date" id="ep-firstDate" error={err("firstDate")}><input {...isoDateInput} {...input("firstDate")} /></Field>
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
        <LiveStatusLine status={live.status} failure={live.failure} other={other} testId="ep-status" />
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
        <p className="rounded border border-dusk-400 bg-dusk-100 px-3 py-2 text-sm" role="status" data-testid="ep-moved">
          With your moved epochs: σ(μα*) {fmt(movedP.properMotionPrecisionMasPerYr.ra, 3)}, σ(μδ) {fmt(movedP.properMotionPrecisionMasPerYr.dec, 3)} mas/yr, σ(ϖ){" "}
          {fmt(movedP.parallaxPrecisionMas, 3)} mas{movedP.determined ? "" : " (these dates cannot separate the parameters)"}.{" "}
          <button type="button" className="btn-quiet" onClick={() => setMoved(null)}>
            Back to the plan
          </button>
        </p>
      ) : null}

      <figure className="space-y-2">
        <figcaption className="text-sm font-semibold text-night-900">Parallax factors over the baseline (lines) and the planned epochs (dots)</figcaption>
        <div className="h-64 w-full">
          <ClientOnly fallback={<ChartPlaceholder className="h-64 w-full" />}>
            <ParallaxChartLazy plan={plan} />
          </ClientOnly>
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
                    <input
                      {...isoDateInput}
                      aria-label={`Epoch ${i + 1} date`}
                      aria-invalid={movedError(i) ? true : undefined}
                      aria-describedby={movedError(i) ? `ep-moved-${i}-error` : undefined}
                      className="input mt-0 w-32 py-1"
                      value={moved?.[i] ?? e.date}
                      onChange={(ev) => moveEpoch(i, ev.target.value)}
                    />
                    {movedError(i) ? <p id={`ep-moved-${i}-error`} className="field-error" role="alert">{movedError(i)}</p> : null}
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
