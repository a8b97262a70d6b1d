import { zodResolver } from "@hookform/resolvers/zod";
import { useForm, type Resolver } from "react-hook-form";
import { useFetcher } from "react-router";
import { Bar, BarChart, CartesianGrid, Cell, Line, LineChart, ReferenceArea, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { Field, inputProps } from "~/components/Field";
import { airmass } from "~/lib/astro/airmass";
import { visibilityQuerySchema, type VisibilityQuery } from "~/lib/astro/schemas";
import type { VisibilityJson } from "~/lib/astro/visibility";
import { MOON_COLOURS, fmt, isApiError, localTime, useLiveForm, useServerIssues, utcTime } from "./live";

export type VisibilityForm = {
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

const FIELDS = ["lat", "lon", "elevation", "timeZone", "ra", "dec", "from", "nights", "minAltitude", "maxAirmass", "night"] as const;

export function VisibilityTool({ defaults, initial }: { defaults: VisibilityForm; initial: VisibilityAnswer }) {
  const fetcher = useFetcher<VisibilityAnswer>();
  const form = useForm<VisibilityForm, unknown, VisibilityQuery>({
    resolver: zodResolver(visibilityQuerySchema) as unknown as Resolver<VisibilityForm, unknown, VisibilityQuery>,
    defaultValues: defaults,
    mode: "onChange",
  });
  useLiveForm(form, () => {
    const raw = form.getValues();
    const query = new URLSearchParams(Object.entries(raw).filter(([, v]) => v !== ""));
    fetcher.load(`/api/v1/visibility?${query}`);
  });
  useServerIssues(form, fetcher.data, FIELDS);
  const answer = fetcher.data && !isApiError(fetcher.data) ? fetcher.data : initial;
  const err = (k: (typeof FIELDS)[number]) => form.formState.errors[k]?.message as string | undefined;
  const tz = answer.site.timeZone;
  const input = (k: (typeof FIELDS)[number], extra: Record<string, unknown> = {}) => ({ ...inputProps(`vis-${k}`, err(k)), ...form.register(k), ...extra });

  return (
    <section className="card space-y-6" aria-labelledby="vis-title">
      <div>
        <h2 id="vis-title">Visibility</h2>
        <p className="text-sm text-slate-600">
          Nights from a date at a site: twilight, the windows in which the target stands above the limit in the dark, and the Moon.
        </p>
      </div>
      <form className="grid grid-cols-2 gap-4 md:grid-cols-4 lg:grid-cols-6" noValidate onSubmit={(e) => e.preventDefault()}>
        <Field label="Latitude (°, N +)" id="vis-lat" error={err("lat")}><input inputMode="decimal" {...input("lat")} /></Field>
        <Field label="Longitude (°, E +)" id="vis-lon" error={err("lon")}><input inputMode="decimal" {...input("lon")} /></Field>
        <Field label="Elevation (m)" id="vis-elevation" error={err("elevation")}><input inputMode="decimal" {...input("elevation")} /></Field>
        <Field label="Time zone (IANA)" id="vis-timeZone" error={err("timeZone")}><input {...input("timeZone")} /></Field>
        <Field label="RA (J2000)" id="vis-ra" error={err("ra")} hint="hh:mm:ss or degrees"><input {...input("ra")} /></Field>
        <Field label="Dec (J2000)" id="vis-dec" error={err("dec")} hint="±dd:mm:ss or degrees"><input {...input("dec")} /></Field>
        <Field label="First night" id="vis-from" error={err("from")}><input type="date" {...input("from")} /></Field>
        <Field label="Nights (1–366)" id="vis-nights" error={err("nights")}><input inputMode="numeric" {...input("nights")} /></Field>
        <Field label="Min altitude (°)" id="vis-minAltitude" error={err("minAltitude")} hint="or leave empty and give an air mass"><input inputMode="decimal" {...input("minAltitude")} /></Field>
        <Field label="Max air mass" id="vis-maxAirmass" error={err("maxAirmass")} hint="Kasten & Young (1989)"><input inputMode="decimal" {...input("maxAirmass")} /></Field>
        <Field label="Night for the chart" id="vis-night" error={err("night")}><input type="date" {...input("night")} /></Field>
        <div className="self-end pb-2 text-sm text-slate-500" aria-live="polite">{fetcher.state === "loading" ? "Computing…" : "Up to date"}</div>
      </form>

      <Summary answer={answer} />
      {answer.curve ? <AltitudeChart curve={answer.curve} limit={answer.limit.minAltitudeDeg} timeZone={tz} /> : null}
      <HoursChart answer={answer} />
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

function AltitudeChart({ curve, limit, timeZone }: { curve: Curve; limit: number; timeZone: string }) {
  const data = curve.points.map((p) => ({ t: Date.parse(p.time), target: p.targetAltDeg, sun: p.sunAltDeg, moon: p.moonAltDeg }));
  const first = data[0]?.t ?? 0;
  const last = data[data.length - 1]?.t ?? 0;
  const darkStart = curve.darkStart ? Date.parse(curve.darkStart) : null;
  const darkEnd = curve.darkEnd ? Date.parse(curve.darkEnd) : null;
  const tick = (t: number) => `${new Date(t).toISOString().slice(11, 16)}`;
  const rows = curve.points.filter((_, i) => i % 3 === 0);
  return (
    <figure className="space-y-3">
      <figcaption className="text-sm font-semibold text-night-900">
        Altitude on the night of {curve.date} (UTC on the axis; shaded: twilight and day, Sun above −18°; dashed: altitude limit {fmt(limit, 1)}°)
      </figcaption>
      <div className="h-72 w-full">
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={data} margin={{ top: 8, right: 16, bottom: 8, left: 0 }}>
            <CartesianGrid stroke="#e2e8f0" />
            <XAxis dataKey="t" type="number" domain={[first, last]} tickFormatter={tick} scale="time" />
            <YAxis domain={[-20, 90]} allowDataOverflow ticks={[-18, 0, 15, 30, 45, 60, 75, 90]} unit="°" />
            {darkStart === null || darkEnd === null ? (
              <ReferenceArea x1={first} x2={last} fill="#fbefdc" fillOpacity={0.8} />
            ) : (
              <>
                <ReferenceArea x1={first} x2={darkStart} fill="#fbefdc" fillOpacity={0.8} />
                <ReferenceArea x1={darkEnd} x2={last} fill="#fbefdc" fillOpacity={0.8} />
              </>
            )}
            <ReferenceLine y={limit} stroke="#b91c1c" strokeDasharray="6 4" />
            <ReferenceLine y={0} stroke="#64748b" />
            <Tooltip labelFormatter={(t) => `${tick(Number(t))} UTC · ${localTime(new Date(Number(t)).toISOString(), timeZone)} local`} formatter={(v) => `${fmt(Number(v), 1)}°`} />
            <Line type="monotone" dataKey="target" name="Target" stroke="#1e3a5f" strokeWidth={2.5} dot={false} isAnimationActive={false} />
            <Line type="monotone" dataKey="moon" name="Moon" stroke="#8a9bb0" strokeDasharray="4 3" strokeWidth={2} dot={false} isAnimationActive={false} />
            <Line type="monotone" dataKey="sun" name="Sun" stroke="#d98e2b" strokeWidth={2} dot={false} isAnimationActive={false} />
          </LineChart>
        </ResponsiveContainer>
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

function HoursChart({ answer }: { answer: VisibilityAnswer }) {
  const data = answer.summary.hoursPerNight;
  return (
    <figure className="space-y-2">
      <figcaption className="text-sm font-semibold text-night-900">Observable hours per night, coloured by moon category</figcaption>
      <div className="h-56 w-full">
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={data} margin={{ top: 8, right: 16, bottom: 8, left: 0 }} barCategoryGap={0}>
            <CartesianGrid stroke="#e2e8f0" vertical={false} />
            <XAxis dataKey="date" tickFormatter={(d: string) => d.slice(5)} minTickGap={24} />
            <YAxis unit=" h" />
            <Tooltip formatter={(v) => `${fmt(Number(v), 2)} h`} />
            <Bar dataKey="hours" isAnimationActive={false}>
              {data.map((d) => (
                <Cell key={d.date} fill={MOON_COLOURS[d.moonCategory]} />
              ))}
            </Bar>
          </BarChart>
        </ResponsiveContainer>
      </div>
      <p className="flex gap-4 text-xs text-slate-600">
        {(["dark", "grey", "bright"] as const).map((c) => (
          <span key={c} className="inline-flex items-center gap-1">
            <span className="inline-block h-3 w-3 rounded-sm" style={{ background: MOON_COLOURS[c] }} /> {c}
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
