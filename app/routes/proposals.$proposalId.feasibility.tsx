import { lazy, useEffect, useMemo, useState } from "react";
import { Form, Link, useFetcher, useNavigation, useRevalidator } from "react-router";
import { ChartPlaceholder, ClientOnly, useHydrated } from "~/components/ClientOnly";
import { ProblemsList, TotalsTable } from "~/components/FeasibilityParts";
import { fixed as fx, fixedNoMinusZero as f0, hours } from "~/lib/format";
import { ErrorPage } from "~/components/ErrorPage";
import { Field, inputProps } from "~/components/Field";
import { orNotFound } from "~/lib/actions.server";
import { formatDec, formatRa } from "~/lib/astro/coordinates";
import { isIsoDate } from "~/lib/astro/time";
import { requireUser } from "~/lib/auth/auth.server";
import type { ObservationSheet } from "~/lib/proposals/feasibility";
import { fromColumns, observationDetails, sheetSummary, type ObservationDetails, type ObservationSummary, type SheetSummary } from "~/lib/proposals/feasibility-summary";
import { altitudeChartFor, feasibilitySheetOf, loadFeasibilityInput } from "~/lib/proposals/feasibility.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import type { Route } from "./+types/proposals.$proposalId.feasibility";

// recharts is a large chunk: the charts load in the browser only, on the pages that draw them
const charts = () => import("~/components/FeasibilityCharts");
const AltitudeChart = lazy(() => charts().then((m) => ({ default: m.AltitudeChart })));
const HoursPerNightChart = lazy(() => charts().then((m) => ({ default: m.HoursPerNightChart })));
const ParallaxFactorChart = lazy(() => charts().then((m) => ({ default: m.ParallaxFactorChart })));

export function meta() {
  return [{ title: "Feasibility sheet · Nightshare" }];
}

// Read in the loader on every visit (cached by its inputs' hash): after the observations tab
// saves, React Router revalidates this loader, so the sheet always reflects the saved data.
// The page gets the sheet's summary and the details of the cards that start open (the first
// three); another card fetches its details from the sheet's API when it opens.
const OPEN_CARDS = 3;

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await orNotFound(getProposalForUser({ proposalId, user }));
  const started = performance.now();
  const input = await orNotFound(loadFeasibilityInput({ proposalId }));
  const sheet = feasibilitySheetOf(input);
  const url = new URL(request.url);
  const obsParam = url.searchParams.get("obs");
  const nightParam = url.searchParams.get("night")?.trim() || null;
  const chartObservationId = obsParam && sheet.observations.some((o) => o.observationId === Number(obsParam)) ? Number(obsParam) : (sheet.observations[0]?.observationId ?? null);
  let nightError: string | null = null;
  let night: string | null = null;
  if (nightParam) {
    if (!isIsoDate(nightParam)) nightError = "Enter the night as YYYY-MM-DD (the local date on which it begins).";
    else if (nightParam < sheet.semesterStart || nightParam > sheet.semesterEnd) nightError = `Choose a night inside the semester, ${sheet.semesterStart} to ${sheet.semesterEnd}.`;
    else night = nightParam;
  }
  const chart = chartObservationId === null ? null : altitudeChartFor(input, sheet, chartObservationId, night);
  const openDetails = sheet.observations.slice(0, OPEN_CARDS).map((o) => observationDetails(sheet, o.observationId)!);
  return { sheet: sheetSummary(sheet), openDetails, chart, night: { value: nightParam ?? chart?.date ?? "", error: nightError }, ms: Math.round(performance.now() - started) };
}

/** fixed digits without a negative zero ("-0.000" reads as a sign) */
const e = (x: number) => (x >= 1e5 ? x.toExponential(2) : x >= 100 ? Math.round(x).toLocaleString("en-GB") : x.toFixed(1));

function NoiseTable({ exposure }: { exposure: NonNullable<ObservationSheet["exposure"]> }) {
  const n = exposure.noise;
  const total = n.source + n.sky + n.dark + n.read;
  const rows: [string, number, string][] = [
    ["source (N*)", n.source, `${e(exposure.sourceElectrons)} e⁻ in the aperture`],
    ["sky (n_pix · N_sky)", n.sky, `${e(exposure.skyElectronsPerPixel)} e⁻/pixel, ${exposure.skyMagPerArcsec2} mag/arcsec²`],
    ["dark (n_pix · N_dark)", n.dark, `${e(exposure.darkElectronsPerPixel)} e⁻/pixel`],
    ["read (n_pix · RN²)", n.read, `${exposure.readNoiseE} e⁻ RMS per pixel`],
  ];
  return (
    <div className="overflow-x-auto">
    <table className="table-base">
      <thead>
        <tr>
          <th>Noise term</th>
          <th className="text-right">Variance (e⁻²)</th>
          <th className="text-right">Share</th>
          <th>From</th>
        </tr>
      </thead>
      <tbody>
        {rows.map(([label, v, from]) => (
          <tr key={label}>
            <td>{label}</td>
            <td className="text-right">{e(v)}</td>
            <td className="text-right">{((100 * v) / total).toFixed(1)} %</td>
            <td>{from}</td>
          </tr>
        ))}
      </tbody>
      <tfoot>
        <tr>
          <td className="px-3 py-2 font-semibold">total</td>
          <td className="px-3 py-2 text-right font-semibold">{e(total)}</td>
          <td className="px-3 py-2 text-right">100 %</td>
          <td className="px-3 py-2 text-slate-600">SNR = N* / √total = {exposure.snr.toFixed(1)} ({exposure.regime})</td>
        </tr>
      </tfoot>
    </table>
    </div>
  );
}

function ObservationCard({ o, sheet, given, mine }: { o: ObservationSummary; sheet: SheetSummary; given: ObservationDetails | undefined; mine: SheetSummary["problems"] }) {
  const [open, setOpen] = useState(given !== undefined);
  const fetcher = useFetcher<ObservationDetails | { error: string }>();
  // the sheet's time of computation in the address: a changed sheet is fetched again
  const url = `/api/v1/proposals/${sheet.proposalId}/feasibility?observationId=${o.observationId}&sheet=${encodeURIComponent(sheet.computedAt)}`;
  const [asked, setAsked] = useState<string | null>(null);
  useEffect(() => {
    if (open && !given && asked !== url) {
      setAsked(url);
      fetcher.load(url);
    }
  }, [open, given, asked, url, fetcher]);
  const fetched = fetcher.data && "observation" in fetcher.data ? fetcher.data : undefined;
  const refused = fetcher.data && "error" in fetcher.data ? fetcher.data.error : null;
  const details = given ?? fetched;
  return (
    <details
      id={`obs-${o.observationId}`}
      open={open}
      onToggle={(ev) => setOpen((ev.currentTarget as HTMLDetailsElement).open)}
      className="card"
    >
      <summary className="cursor-pointer">
        <span className="text-base font-semibold text-night-900">{o.targetName}</span>{" "}
        <span className="text-sm text-slate-600">
          {`· ${o.telescopeName}, ${o.instrumentName}, ${o.band} · ${o.moonCategory} time · airmass ≤ ${o.maxAirmass} · ${hours(o.requestedHoursThisSemester, 2)} in ${sheet.semesterCode}`}
        </span>
        {mine.some((p) => p.severity === "blocking") ? (
          <span className="ml-2 rounded bg-red-100 px-2 py-0.5 text-xs font-semibold text-red-800">blocking</span>
        ) : mine.length ? (
          <span className="ml-2 rounded bg-amber-100 px-2 py-0.5 text-xs font-semibold text-amber-900">warning</span>
        ) : (
          <span className="ml-2 rounded bg-emerald-100 px-2 py-0.5 text-xs font-semibold text-emerald-900">feasible</span>
        )}
      </summary>
      {open && details ? (
        <CardDetails o={details.observation} nights={details.nights} sheet={sheet} mine={mine} />
      ) : open ? (
        <p className="mt-4 text-sm text-slate-600" role="status">
          {refused ?? "Loading the details…"}
        </p>
      ) : null}
    </details>
  );
}

function CardDetails({ o, nights, sheet, mine }: { o: ObservationSheet; nights: ObservationDetails["nights"]; sheet: SheetSummary; mine: SheetSummary["problems"] }) {
  const x = o.exposure;
  const t = o.timePerEpoch;
  const a = o.astrometry;
  return (
        <div className="mt-4 space-y-5">
          {mine.length ? <ProblemsList problems={mine} /> : null}
          <section className="space-y-2">
            <h3 className="font-semibold text-night-900">Visibility in {sheet.semesterCode}</h3>
            <dl className="grid grid-cols-2 gap-x-6 gap-y-1 text-sm sm:grid-cols-4">
              <div><dt className="text-slate-500">Observable, all nights</dt><dd className="font-semibold">{hours(o.visibility.observableHours)}</dd></div>
              <div><dt className="text-slate-500" title="split at moonrise and moonset">dark / grey / bright (by the Moon's altitude)</dt><dd>{fx(o.visibility.byMoonCategory.dark)} / {fx(o.visibility.byMoonCategory.grey)} / {fx(o.visibility.byMoonCategory.bright)} h</dd></div>
              <div><dt className="text-slate-500">Usable in {o.moonCategory} time</dt><dd className="font-semibold">{hours(o.visibility.usableHours)} on {o.visibility.usableNights} nights</dd></div>
              <div><dt className="text-slate-500">Best months</dt><dd>{o.visibility.bestMonths.map((m) => `${m.month} (${fx(m.observableHours, 0)} h)`).join(", ") || "—"}</dd></div>
              <div><dt className="text-slate-500">Airmass limit → altitude</dt><dd>{o.maxAirmass} → {fx(o.minAltitudeDeg)}°</dd></div>
              <div><dt className="text-slate-500">Best airmass (transit)</dt><dd>{fx(o.visibility.bestAirmass, 3)}</dd></div>
              <div><dt className="text-slate-500">Longest night window</dt><dd>{o.visibility.bestNight ? <Link to={`?obs=${o.observationId}&night=${o.visibility.bestNight}#altitude`}>{o.visibility.bestNight}</Link> : "—"}</dd></div>
              <div><dt className="text-slate-500">Seeing assumed</dt><dd>{o.seeingArcsec}″</dd></div>
            </dl>
            <ClientOnly fallback={<ChartPlaceholder className="h-48 w-full" />}>
              <HoursPerNightChart nights={nights} hoursPerNight={o.visibility.hoursPerNight} />
            </ClientOnly>
            <Link to={`?obs=${o.observationId}#altitude`} className="text-sm">Altitude against time on a chosen night →</Link>
          </section>

          <section className="space-y-2">
            <h3 className="font-semibold text-night-900">Exposure and signal-to-noise, per frame</h3>
            {x ? (
              <>
                <p className="text-sm">
                  {x.mode === "snr-goal" ? "For the SNR goal" : "For the exposure given"}: <strong>{fx(x.exposureSeconds, 1)} s</strong> per frame gives <strong>SNR {fx(x.snr, 1)}</strong> on a {o.magnitudeUsed ? (o.magnitudeUsed.assumed ? `${o.band} = ${o.magnitudeUsed.band} = ${x.magnitude} (assumed, colour 0)` : `${o.band} = ${x.magnitude}`) : x.magnitude} star at airmass {x.airmass} (extinction {x.extinctionMagPerAirmass} mag/airmass), in an aperture of radius {fx(x.apertureRadiusArcsec, 2)}″ ({fx(x.pixels, 1)} pixels, {fx(100 * x.apertureFraction, 1)} % of the light).
                </p>
                <NoiseTable exposure={x} />
                <p className={`text-sm ${x.saturated ? "font-semibold text-red-800" : ""}`}>
                  Peak pixel: {e(x.peakPixelElectrons)} e⁻ at airmass {x.airmass}; {e(x.peakAtBestAirmassElectrons)} e⁻ at the best airmass, against a full well of {e(x.fullWellE)} e⁻ ({fx((100 * x.peakAtBestAirmassElectrons) / x.fullWellE, 0)} %).{" "}
                  {x.saturated ? `Saturated: keep frames at or below ${fx(x.maxUnsaturatedSeconds, 1)} s.` : `Frames up to ${fx(Math.min(x.maxUnsaturatedSeconds, 1e6), 0)} s stay below full well.`}
                </p>
              </>
            ) : (
              <p className="text-sm text-slate-600">Not computed: see the problems above.</p>
            )}
          </section>

          <section className="space-y-1">
            <h3 className="font-semibold text-night-900">Time per epoch</h3>
            <p className="text-sm">
              {t.frames} frame{t.frames === 1 ? "" : "s"} × ({fx(t.exposureSeconds, 1)} s exposure + {t.readoutSeconds} s readout) + {t.acquisitionSeconds} s acquisition ={" "}
              <strong>{t.totalSeconds === null ? "—" : `${fx(t.totalSeconds, 0)} s (${fx(t.totalSeconds / 3600, 3)} h)`}</strong>; {o.epochsThisSemester} epoch{o.epochsThisSemester === 1 ? "" : "s"} in {sheet.semesterCode} → {hours(o.requestedHoursThisSemester, 2)}.
            </p>
          </section>

          {a ? (
            <section className="space-y-2">
              <h3 className="font-semibold text-night-900">Astrometric epochs over {a.baselineYears} year{a.baselineYears === 1 ? "" : "s"}</h3>
              <p className="text-sm">
                {a.source === "planned" ? "The team's planned epochs" : "Epochs proposed by the planner (the team has not planned any yet)"}; per-epoch precision {fx(a.perEpochPrecisionMas, 2)} mas.{" "}
                Proper-motion precision reached:{" "}
                <strong>{a.properMotionPrecisionMasPerYr ? `${fx(a.properMotionPrecisionMasPerYr.ra, 3)} (α*) / ${fx(a.properMotionPrecisionMasPerYr.dec, 3)} (δ) mas/yr` : "not determined"}</strong>
                {a.requiredPmPrecisionMasPerYr !== null ? `, ${a.requiredPmPrecisionMasPerYr} mas/yr required (${a.met ? "met" : "not met"})` : ""}; parallax precision{" "}
                <strong>{a.parallaxPrecisionMas !== null ? `${fx(a.parallaxPrecisionMas, 3)} mas` : "not determined"}</strong>.
                {" "}Asked: {a.epochsPerSemester} epoch{a.epochsPerSemester === 1 ? "" : "s"} per semester; each epoch may be taken within ±{a.toleranceNights} nights.
              </p>
              {a.advice.length ? (
                <ul className="list-disc pl-5 text-sm text-night-900">
                  {a.advice.map((line) => <li key={line}>{line}</li>)}
                </ul>
              ) : null}
              {a.parallaxCurve.length ? (
                <ClientOnly fallback={<ChartPlaceholder className="h-56 w-full" />}>
                  <ParallaxFactorChart curve={a.parallaxCurve} epochs={a.epochs} />
                </ClientOnly>
              ) : null}
              <div className="grid gap-4 md:grid-cols-[2fr_1fr]">
                <div className="min-w-0 overflow-x-auto">
                <table className="table-base">
                  <thead>
                    <tr>
                      <th>Night of</th>
                      <th>Semester</th>
                      <th className="text-right">f(α*)</th>
                      <th className="text-right">f(δ)</th>
                      <th className="text-right">Observable</th>
                      <th className="text-right" title="nights within the tolerance that have the time the visit needs">Usable nights</th>
                      <th>Status</th>
                    </tr>
                  </thead>
                  <tbody>
                    {a.epochs.map((ep) => (
                      <tr key={ep.date} className={ep.inWindow === false ? "bg-red-50" : undefined}>
                        <td>{ep.date}</td>
                        <td>{ep.semesterCode}</td>
                        <td className="text-right">{f0(ep.parallaxFactorRa, 3)}</td>
                        <td className="text-right">{f0(ep.parallaxFactorDec, 3)}</td>
                        <td className="text-right">{ep.observableHours === null ? "—" : hours(ep.observableHours, 2)}</td>
                        <td className="text-right">{ep.window ? `${ep.window.usableNights} in ±${a.toleranceNights}` : "—"}{ep.fragile ? <span className="ml-1 font-semibold text-amber-800">fragile</span> : null}</td>
                        <td>{ep.inWindow === false ? <span className="font-semibold text-red-800">outside window</span> : ep.status}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
                </div>
                <div className="min-w-0 overflow-x-auto">
                <table className="table-base">
                  <thead>
                    <tr>
                      <th>Semester</th>
                      <th className="text-right">Epochs</th>
                      <th className="text-right">Hours</th>
                    </tr>
                  </thead>
                  <tbody>
                    {a.perSemester.map((s) => (
                      <tr key={s.semesterCode}>
                        <td>{s.semesterCode}</td>
                        <td className="text-right">{s.epochs}</td>
                        <td className="text-right">{hours(s.hours, 2)}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
                </div>
              </div>
            </section>
          ) : null}
        </div>
  );
}

export default function FeasibilitySheetPage({ loaderData }: Route.ComponentProps) {
  const { sheet, openDetails, chart, night, ms } = loaderData;
  const navigation = useNavigation();
  const revalidator = useRevalidator();
  // Edits made in another tab or window (e.g. the observations tab) show when the user comes back.
  useEffect(() => {
    const onFocus = () => {
      if (document.visibilityState === "visible" && revalidator.state === "idle") revalidator.revalidate();
    };
    document.addEventListener("visibilitychange", onFocus);
    return () => document.removeEventListener("visibilitychange", onFocus);
  }, [revalidator]);
  const c = sheet.conventions;
  const observations = useMemo(() => fromColumns(sheet.columns), [sheet.columns]);
  const hydrated = useHydrated();
  const problemsOf = useMemo(() => {
    const out = new Map<number, SheetSummary["problems"]>();
    for (const p of sheet.problems) if (p.observationId !== undefined) out.set(p.observationId, [...(out.get(p.observationId) ?? []), p]);
    return out;
  }, [sheet.problems]);
  const chartObs = chart ? observations.find((o) => o.observationId === chart.observationId) : null;
  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-baseline justify-between gap-3">
        <h2>Feasibility sheet for {sheet.semesterCode}</h2>
        <p className="text-xs text-slate-500">
          Computed {sheet.computedAt.slice(0, 19).replace("T", " ")} UTC in {ms} ms from the saved targets and observations
          {navigation.state === "loading" || revalidator.state === "loading" ? " · updating…" : ""}
        </p>
      </div>
      <ProblemsList problems={sheet.problems} />

      <section className="card space-y-3">
        <h2>Requested time</h2>
        <div className="overflow-x-auto">
          <TotalsTable sheet={sheet} />
        </div>
      </section>

      <section className="space-y-3">
        <h2>Targets and observations</h2>
        {observations.length === 0 ? (
          <p className="text-sm text-slate-600">
            Nothing to compute yet. Add targets and observations on the <Link to="../observations">observations tab</Link>.
          </p>
        ) : (
          <div className="card overflow-x-auto p-0">
          <table className="table-base">
            <thead>
              <tr>
                <th>Target</th>
                <th>RA (J2000)</th>
                <th>Dec (J2000)</th>
                <th className="text-right">Mag</th>
                <th className="text-right">Observable</th>
                <th className="text-right">Requested</th>
                <th>Status</th>
              </tr>
            </thead>
            {/* the cells' classes on the body: 500 rows would repeat them 3 000 times */}
            <tbody className="[&>tr>td:first-child>span]:text-xs [&>tr>td:first-child>span]:text-slate-500 [&>tr>td:nth-child(2)]:font-mono [&>tr>td:nth-child(2)]:text-xs [&>tr>td:nth-child(3)]:font-mono [&>tr>td:nth-child(3)]:text-xs [&>tr>td:nth-child(n+4):nth-child(-n+6)]:text-right">
              {observations.map((o) => {
                const bad = problemsOf.get(o.observationId)?.some((p) => p.severity === "blocking") ?? false;
                return (
                  <tr key={o.observationId}>
                    <td><a href={`#obs-${o.observationId}`}>{o.targetName}</a> <span>{`${o.telescopeName} · ${o.band}`}</span></td>
                    <td>{o.raDeg === null ? "—" : formatRa(o.raDeg, 1)}</td>
                    <td>{o.decDeg === null ? "—" : formatDec(o.decDeg, 0)}</td>
                    <td>{`${o.magnitude ?? "—"}${o.magnitudeBand ? ` ${o.magnitudeBand}` : ""}`}</td>
                    <td>{hours(o.usableHours)}</td>
                    <td>{hours(o.requestedHoursThisSemester, 2)}</td>
                    <td>{bad ? <span className="font-semibold text-red-800">blocking</span> : "ok"}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          </div>
        )}
        {/* the cards after the open ones come with the browser's first render: they are far below
            the table, and their details need the browser anyway (500 of them are ~250 KB of HTML) */}
        {(hydrated ? observations : observations.slice(0, openDetails.length)).map((o) => (
          <ObservationCard key={o.observationId} o={o} sheet={sheet} mine={problemsOf.get(o.observationId) ?? []} given={openDetails.find((d) => d.observation.observationId === o.observationId)} />
        ))}
      </section>

      {chart && chartObs ? (
        <section id="altitude" className="card space-y-3">
          <h2>Altitude on one night</h2>
          <Form method="get" preventScrollReset className="grid items-end gap-3 sm:grid-cols-[2fr_1fr_auto]">
            <div>
              <label htmlFor="obs">Observation</label>
              <select id="obs" name="obs" defaultValue={chart.observationId} className="input">
                {observations.map((o) => (
                  <option key={o.observationId} value={o.observationId}>
                    {`${o.targetName} · ${o.telescopeName} · ${o.band}`}
                  </option>
                ))}
              </select>
            </div>
            <Field id="night" label="Night beginning (local date)" error={night.error ?? undefined}>
              <input {...inputProps("night", night.error ?? undefined)} name="night" defaultValue={night.value} placeholder="YYYY-MM-DD" />
            </Field>
            <button type="submit" className="btn">Show</button>
          </Form>
          <p className="text-sm text-slate-600">
            {chartObs.targetName} on the night of {chart.date}: dark from {chart.darkStart?.slice(11, 16) ?? "—"} to {chart.darkEnd?.slice(11, 16) ?? "—"} UTC (sunset {chart.sunset?.slice(11, 16) ?? "—"}, sunrise {chart.sunrise?.slice(11, 16) ?? "—"}).
          </p>
          <ClientOnly fallback={<ChartPlaceholder className="h-64 w-full" />}>
            <AltitudeChart points={chart.points} minAltitudeDeg={chart.minAltitudeDeg} darkStart={chart.darkStart} darkEnd={chart.darkEnd} />
          </ClientOnly>
        </section>
      ) : null}

      <section className="text-xs text-slate-600">
        <h3 className="font-semibold text-slate-700">How the sheet is computed</h3>
        <ul className="mt-1 list-disc space-y-0.5 pl-5">
          <li>{c.moonTimeRule} Dark time uses the dark hours only; grey time dark or grey hours; bright time any hour. A night's single category (the charts' colours) is that of the illuminated fraction at mid-darkness: dark below {c.moonCategoryThresholds.darkBelow * 100} %, grey below {c.moonCategoryThresholds.greyBelow * 100} %, bright otherwise.</li>
          <li>Darkness: the Sun's centre below {c.twilightAltitudeDeg}°. Refraction: {c.refraction}. Airmass: {c.airmassFormula}.</li>
          <li>Exposure: {c.exposure}.</li>
          <li>Astrometry: {c.centroid}.</li>
          <li>Time per epoch: {c.timePerEpoch}.</li>
        </ul>
      </section>
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorPage error={error} />;
}
