// What the PI (and the office) see of one observation's epochs: precision so far, projected and
// required; the parallax-factor chart, the calendar and the table of epochs.
import { lazy } from "react";
import { ChartPlaceholder, ClientOnly } from "~/components/ClientOnly";
import type { EpochProgress } from "~/lib/epochs/epochs.server";
import { fixed } from "~/lib/format";
import { EpochCalendar, type CalendarMark } from "./EpochCalendar";

const EpochProgressChart = lazy(() => import("./EpochChart").then((m) => ({ default: m.EpochProgressChart })));

type Observation = EpochProgress["observations"][number];
type Reached = Observation["reachedSoFar"];

function PrecisionCell({ label, p, testId, met }: { label: string; p: Reached | null; testId: string; met?: boolean | null }) {
  return (
    <div className="rounded-md border border-slate-200 p-3" data-testid={testId}>
      <p className="text-xs font-semibold uppercase tracking-wide text-slate-600">{label}</p>
      {p && p.determined && p.properMotionPrecisionMasPerYr ? (
        <dl className="mt-1 grid grid-cols-[auto_1fr] gap-x-3 text-sm tabular-nums">
          <dt>σ(μα*)</dt><dd data-testid={`${testId}-pmra`}>{fixed(p.properMotionPrecisionMasPerYr.ra, 3)} mas/yr</dd>
          <dt>σ(μδ)</dt><dd data-testid={`${testId}-pmdec`}>{fixed(p.properMotionPrecisionMasPerYr.dec, 3)} mas/yr</dd>
          <dt>σ(ϖ)</dt><dd data-testid={`${testId}-plx`}>{fixed(p.parallaxPrecisionMas, 3)} mas</dd>
          <dt>epochs</dt><dd>{p.epochs}</dd>
        </dl>
      ) : (
        <p className="mt-1 text-sm text-slate-700" data-testid={`${testId}-undetermined`}>
          Not determined yet: {p?.epochs ?? 0} epoch{p?.epochs === 1 ? "" : "s"}; position, proper motion and parallax need at least 3 at different dates.
        </p>
      )}
      {met === undefined || met === null ? null : <p className={`mt-1 text-sm font-semibold ${met ? "text-emerald-800" : "text-amber-800"}`}>{met ? "meets the requirement" : "short of the requirement"}</p>}
    </div>
  );
}

export function PrecisionSummary({ o }: { o: Observation }) {
  return (
    <div className="grid gap-3 md:grid-cols-3">
      <PrecisionCell label="Reached so far" p={o.reachedSoFar} testId="reached" met={o.metSoFar} />
      <PrecisionCell label="Projected (remaining planned epochs taken)" p={o.projected} testId="projected" met={o.metProjected} />
      <div className="rounded-md border border-slate-200 p-3" data-testid="required">
        <p className="text-xs font-semibold uppercase tracking-wide text-slate-600">Required</p>
        <p className="mt-1 text-sm tabular-nums">{o.required.properMotionPrecisionMasPerYr === null ? "no proper-motion requirement set" : `σ(μ) ≤ ${fixed(o.required.properMotionPrecisionMasPerYr, 2)} mas/yr in each coordinate`}</p>
        <p className="mt-1 text-xs text-slate-600">Per planned epoch {fixed(o.perEpochPrecisionMas, 2)} mas (the feasibility sheet's), {fixed(o.hoursPerEpoch, 2)} h on sky.</p>
      </div>
    </div>
  );
}

export function EpochViews({ progress, o, telescopeName }: { progress: EpochProgress; o: Observation; telescopeName: (id: number) => string }) {
  const executed = progress.executed.filter((e) => e.observationId === o.observationId);
  const planned = progress.planned.filter((e) => e.observationId === o.observationId);
  const marks: CalendarMark[] = [
    ...executed.map((e) => ({ date: e.observedAt.slice(0, 10), kind: e.lost ? ("lost" as const) : ("executed" as const), label: e.lost ? `lost (${e.lost.cause})` : `executed, ${fixed(e.precisionMas, 2)} mas` })),
    ...planned.map((p) => ({ date: p.date, kind: "planned" as const, label: "planned" })),
    ...(o.replan?.dates ?? []).map((d) => ({ date: d.date, kind: "replan" as const, label: "re-plan" })),
  ];
  const chartEpochs = [
    ...executed.map((e) => ({ t: Date.parse(e.observedAt), ra: e.parallaxFactors.ra, kind: e.lost ? ("lost" as const) : ("executed" as const) })),
    ...planned.map((p) => ({ t: Date.parse(`${p.date}T00:00:00Z`), ra: p.parallaxFactors.ra, kind: "planned" as const })),
    ...(o.replan?.dates ?? []).map((d) => ({ t: Date.parse(`${d.date}T00:00:00Z`), ra: d.parallaxFactors.ra, kind: "replan" as const })),
  ];
  return (
    <>
      <section className="card space-y-2">
        <h3>On the parallax-factor curve</h3>
        <ClientOnly fallback={<ChartPlaceholder className="h-64 w-full" />}>
          <EpochProgressChart curve={o.parallaxCurve} epochs={chartEpochs} />
        </ClientOnly>
      </section>
      <section className="card space-y-2">
        <h3>Calendar</h3>
        <EpochCalendar marks={marks} />
      </section>
      <section className="card space-y-2">
        <h3>Epochs</h3>
        <div className="overflow-x-auto">
          <table className="table-base" aria-label="Epochs">
            <thead>
              <tr><th>When (UTC)</th><th>State</th><th>Telescope</th><th>Frames</th><th>FWHM ″</th><th>SNR</th><th>Precision mas</th><th>f(α*)</th><th>f(δ)</th></tr>
            </thead>
            <tbody>
              {executed.map((e) => (
                <tr key={`x${e.id}`} className={e.lost ? "bg-red-50/60" : ""}>
                  <td className="tabular-nums">{e.observedAt.slice(0, 16).replace("T", " ")}</td>
                  <td>{e.lost ? `lost (${e.lost.cause})` : "executed"}</td>
                  <td>{telescopeName(e.telescopeId)}</td>
                  <td className="tabular-nums">{e.frames}</td>
                  <td className="tabular-nums">{fixed(e.fwhmArcsec, 2)}</td>
                  <td className="tabular-nums">{fixed(e.snr, 0)}</td>
                  <td className="tabular-nums">{e.lost ? "—" : `${fixed(e.precisionMas, 2)} (${e.precisionSource})`}</td>
                  <td className="tabular-nums">{fixed(e.parallaxFactors.ra, 3)}</td>
                  <td className="tabular-nums">{fixed(e.parallaxFactors.dec, 3)}</td>
                </tr>
              ))}
              {planned.map((p) => (
                <tr key={`p${p.id}`} className="text-slate-600">
                  <td className="tabular-nums">{p.date} (night)</td>
                  <td>planned · {p.semesterCode}</td>
                  <td>{telescopeName(o.telescopeId)}</td>
                  <td colSpan={3}></td>
                  <td className="tabular-nums">{fixed(o.perEpochPrecisionMas, 2)} expected</td>
                  <td className="tabular-nums">{fixed(p.parallaxFactors.ra, 3)}</td>
                  <td className="tabular-nums">{fixed(p.parallaxFactors.dec, 3)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>
    </>
  );
}
