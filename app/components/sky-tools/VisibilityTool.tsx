import { lazy } from "react";
import { useForm } from "react-hook-form";
import { ChartPlaceholder, ClientOnly } from "~/components/ClientOnly";
import { Field, inputProps } from "~/components/Field";
import { airmass } from "~/lib/astro/airmass";
import type { VisibilityJson } from "~/lib/astro/visibility";
import { moonCategories } from "~/lib/domain";
import { LiveStatusLine, TelescopePicker } from "./LiveStatus";
import { isoDateInput, issuesByField, localTime, useLiveApi, utcTime, type SkyTelescope } from "./live";
import { grouped as fmt } from "~/lib/format";
import { moonColours } from "~/components/moon-colours";

// recharts is a large chunk: loaded in the browser only, by the pages that draw a chart
const AltitudeChartLazy = lazy(() => import("./VisibilityCharts").then((m) => ({ default: m.AltitudeChart })));
const HoursChartLazy = lazy(() => import("./VisibilityCharts").then((m) => ({ default: m.HoursChart })));

export type VisibilityForm = {
  /** a telescope id, or "custom" for the coordinates below */
  telescope: string;
  lat: string;
  lon: string;
  elevation: string;
  timeZone: string;
  ra: string;
  dec: string;
  from: string;
  nights: string;
  minAltitude: string;
  maxAirmass: string;
  night: string;
};

export type Curve = {
  date: string;
  sunset: string | null;
  sunrise: string | null;
  darkStart: string | null;
  darkEnd: string | null;
  points: { time: string; targetAltDeg: number; sunAltDeg: number; moonAltDeg: number }[];
};

export type VisibilityAnswer = VisibilityJson & { curve?: Curve };

type FieldName = Exclude<keyof VisibilityForm, never>;
/** The form's fields (also the API's query names) and their names in messages. */
const NAMES: Record<FieldName, string> = {
  telescope: "Telescope",
  lat: "Latitude",
  lon: "Longitude",
  elevation: "Elevation",
  timeZone: "Time zone",
  ra: "RA",
  dec: "Dec",
  from: "First night",
  nights: "Nights",
  minAltitude: "Min altitude",
  maxAirmass: "Max air mass",
  night: "Night for the chart",
};
const SITE_FIELDS = ["lat", "lon", "elevation", "timeZone"] as const;

/** The API request for the form's values: the telescope's id, or the free coordinates. */
export function visibilityRequest(v: VisibilityForm) {
  const custom = v.telescope === "custom";
  const query = new URLSearchParams();
  for (const [k, value] of Object.entries(v) as [FieldName, string][]) {
    if (k === "telescope" ? custom : !custom && (SITE_FIELDS as readonly string[]).includes(k)) continue;
    if (value.trim() !== "") query.set(k, value.trim());
  }
  return { method: "GET" as const, url: `/api/v1/visibility?${query}` };
}

export function VisibilityTool({ defaults, initial, telescopes }: { defaults: VisibilityForm; initial: VisibilityAnswer; telescopes: SkyTelescope[] }) {
  const form = useForm<VisibilityForm>({ defaultValues: defaults });
  const values = form.watch();
  const live = useLiveApi<VisibilityAnswer>(visibilityRequest(values), initial);
  const { byField, other } = issuesByField(live.issues, NAMES);
  const answer = live.result;
  const custom = values.telescope === "custom";
  const err = (k: FieldName) => byField[k];
  const input = (k: FieldName) => ({ ...inputProps(`vis-${k}`, err(k)), ...form.register(k) });
  const site = (k: (typeof SITE_FIELDS)[number]) => ({ ...input(k), readOnly: !custom, className: custom ? "input" : "input bg-slate-100 text-slate-600" });
  const pick = (id: string) => {
    const t = telescopes.find((x) => String(x.id) === id);
    form.setValue("telescope", id);
    if (t) {
      form.setValue("lat", String(t.latitudeDeg));
      form.setValue("lon", String(t.longitudeDeg));
      form.setValue("elevation", String(t.elevationM));
      form.setValue("timeZone", t.timeZone);
    }
  };
  const tz = answer.site.timeZone;

  return (
    <section className="card space-y-6" aria-labelledby="vis-title">
      <div>
        <h2 id="vis-title">Visibility</h2>
        <p className="text-sm text-slate-600">
          Nights from a date at a site: twilight, the windows in which the target stands above the limit in the dark, and the Moon.
        </p>
      </div>
      <form className="grid grid-cols-1 gap-4 sm:grid-cols-2 md:grid-cols-4 lg:grid-cols-6" noValidate onSubmit={(e) => e.preventDefault()}>
        <TelescopePicker id="vis-telescope" value={values.telescope} onChange={pick} telescopes={telescopes} error={err("telescope")} />
        <Field label="Latitude (°, N +)" id="vis-lat" error={err("lat")}><input inputMode="decimal" {...site("lat")} /></Field>
        <Field label="Longitude (°, E +)" id="vis-lon" error={err("lon")}><input inputMode="decimal" {...site("lon")} /></Field>
        <Field label="Elevation (m)" id="vis-elevation" error={err("elevation")}><input inputMode="decimal" {...site("elevation")} /></Field>
        <Field label="Time zone (IANA)" id="vis-timeZone" error={err("timeZone")}><input {...site("timeZone")} /></Field>
        <Field label="RA (J2000)" id="vis-ra" error={err("ra")} hint="hh:mm:ss or degrees"><input {...input("ra")} /></Field>
        <Field label="Dec (J2000)" id="vis-dec" error={err("dec")} hint="±dd:mm:ss or degrees"><input {...input("dec")} /></Field>
        <Field label="First night" id="vis-from" error={err("from")} hint="YYYY-MM-DD"><input {...isoDateInput} {...input("from")} /></Field>
        <Field label="Nights (1–366)" id="vis-nights" error={err("nights")}><input inputMode="numeric" {...input("nights")} /></Field>
        <Field label="Min altitude (°)" id="vis-minAltitude" error={err("minAltitude")} hint="or leave empty and give an air mass"><input inputMode="decimal" {...input("minAltitude")} /></Field>
        <Field label="Max air mass" id="vis-maxAirmass" error={err("maxAirmass")} hint="Kasten & Young (1989)"><input inputMode="decimal" {...input("maxAirmass")} /></Field>
        <Field label="Night for the chart" id="vis-night" error={err("night")} hint="YYYY-MM-DD"><input {...isoDateInput} {...input("night")} /></Field>
        <LiveStatusLine status={live.status} failure={live.failure} other={other} testId="vis-status" />
      </form>

      <Summary answer={answer} />
      {answer.curve ? <AltitudeFigure curve={answer.curve} limit={answer.limit.minAltitudeDeg} timeZone={tz} /> : null}
      <HoursFigure answer={answer} />
      <NightsTable answer={answer} />
    </section>
  );
}

function Summary({ answer }: { answer: VisibilityAnswer }) {
  const s = answer.summary;
  return (
    <dl className="grid grid-cols-2 gap-3 text-sm md:grid-cols-6">
      {[
        ["Observable hours", fmt(s.observableHours, 1)],
        ["in dark time", fmt(s.byMoonCategory.dark, 1)],
        ["in grey time", fmt(s.byMoonCategory.grey, 1)],
        ["in bright time", fmt(s.byMoonCategory.bright, 1)],
        ["Dark hours at the site", fmt(s.darkHours, 1)],
        ["Best months", s.bestMonths.map((m) => `${m.month} (${fmt(m.observableHours, 0)} h)`).join(", ") || "—"],
      ].map(([k, v]) => (
        <div key={k} className="rounded-md bg-night-50 px-3 py-2">
          <dt className="text-xs text-slate-500">{k}</dt>
          <dd className="font-semibold text-night-900">{v}</dd>
        </div>
      ))}
    </dl>
  );
}

function AltitudeFigure({ curve, limit, timeZone }: { curve: Curve; limit: number; timeZone: string }) {
  const rows = curve.points.filter((_, i) => i % 3 === 0);
  return (
    <figure className="space-y-3">
      <figcaption className="text-sm font-semibold text-night-900">
        Altitude on the night of {curve.date} (UTC on the axis; shaded: twilight and day, Sun above −18°; dashed: altitude limit {fmt(limit, 1)}°)
      </figcaption>
      <div className="h-72 w-full">
        <ClientOnly fallback={<ChartPlaceholder className="h-72 w-full" />}>
          <AltitudeChartLazy curve={curve} limit={limit} timeZone={timeZone} />
        </ClientOnly>
      </div>
      <p className="text-xs text-slate-500">
        <span className="font-semibold text-night-800">━ target</span> · <span className="font-semibold text-slate-500">┅ Moon</span> ·{" "}
        <span className="font-semibold text-dusk-500">━ Sun</span>. Dark from {utcTime(curve.darkStart)} to {utcTime(curve.darkEnd)} UTC ({localTime(curve.darkStart, timeZone)}–
        {localTime(curve.darkEnd, timeZone)} local).
      </p>
      <div className="max-h-64 overflow-auto rounded border border-slate-200">
        <table className="table-base">
          <thead>
            <tr><th>UTC</th><th>Local ({timeZone})</th><th>Target alt</th><th>Air mass</th><th>Sun alt</th><th>Moon alt</th></tr>
          </thead>
          <tbody>
            {rows.map((p) => (
              <tr key={p.time}>
                <td>{utcTime(p.time)}</td>
                <td>{localTime(p.time, timeZone)}</td>
                <td>{fmt(p.targetAltDeg, 1)}°</td>
                <td>{p.targetAltDeg > 0 ? fmt(airmass(p.targetAltDeg), 2) : "—"}</td>
                <td>{fmt(p.sunAltDeg, 1)}°</td>
                <td>{fmt(p.moonAltDeg, 1)}°</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </figure>
  );
}

function HoursFigure({ answer }: { answer: VisibilityAnswer }) {
  return (
    <figure className="space-y-2">
      <figcaption className="text-sm font-semibold text-night-900">Observable hours per night, coloured by moon category</figcaption>
      <div className="h-56 w-full">
        <ClientOnly fallback={<ChartPlaceholder className="h-56 w-full" />}>
          <HoursChartLazy data={answer.summary.hoursPerNight} />
        </ClientOnly>
      </div>
      <p className="flex gap-4 text-xs text-slate-600">
        {moonCategories.map((c) => (
          <span key={c} className="inline-flex items-center gap-1">
            <span className="inline-block h-3 w-3 rounded-sm" style={{ background: moonColours[c] }} /> {c}
          </span>
        ))}
      </p>
    </figure>
  );
}

function NightsTable({ answer }: { answer: VisibilityAnswer }) {
  const tz = answer.site.timeZone;
  const both = (iso: string | null) => (iso ? `${utcTime(iso)} / ${localTime(iso, tz)}` : "—");
  return (
    <div className="max-h-96 overflow-auto rounded border border-slate-200">
      <table className="table-base">
        <thead className="sticky top-0">
          <tr>
            <th>Night of</th><th>Sunset UTC / local</th><th>Dark from</th><th>Dark until</th><th>Sunrise</th>
            <th>Windows (UTC)</th><th>Hours</th><th>Moon illum.</th><th>Moon sep.</th><th>Moon</th>
          </tr>
        </thead>
        <tbody>
          {answer.nights.map((n) => (
            <tr key={n.date}>
              <td className="whitespace-nowrap">{n.date}</td>
              <td>{both(n.sunset)}</td>
              <td>{both(n.darkStart)}</td>
              <td>{both(n.darkEnd)}</td>
              <td>{both(n.sunrise)}</td>
              <td>{n.windows.map((w) => `${utcTime(w.start)}–${utcTime(w.end)}`).join(", ") || "—"}</td>
              <td>{fmt(n.observableHours, 2)}</td>
              <td>{fmt(n.moon.illumination * 100, 0)} %</td>
              <td>{fmt(n.moon.separationDeg, 0)}°</td>
              <td>{n.moonCategory}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
