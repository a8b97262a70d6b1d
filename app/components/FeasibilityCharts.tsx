// Charts of the feasibility sheet (recharts). Each chart has its numbers in a table beside it
// on the sheet and in the proposal PDF.
import {
  Bar,
  BarChart,
  CartesianGrid,
  Cell,
  Legend,
  Line,
  LineChart,
  ReferenceArea,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  ComposedChart,
  Tooltip,
  XAxis,
  YAxis,
} from "recharts";
import type { MoonCategory } from "~/lib/domain";
import { ALTITUDE_TICKS, PARALLAX_FACTOR_TICKS, halfYearTicks, wholeHourTicks } from "./chart-ticks";
import { moonColours } from "./moon-colours";

export function HoursPerNightChart({ nights, hoursPerNight }: { nights: { date: string; moonCategory: MoonCategory }[]; hoursPerNight: number[] }) {
  const data = nights.map((n, i) => ({ date: n.date, hours: hoursPerNight[i] ?? 0, moonCategory: n.moonCategory }));
  return (
    <figure>
      <div className="h-48 w-full">
        <ResponsiveContainer width="100%" height="100%">
          <BarChart data={data} margin={{ top: 5, right: 10, bottom: 5, left: 0 }} barCategoryGap={0}>
            <CartesianGrid strokeDasharray="3 3" vertical={false} />
            <XAxis dataKey="date" tickFormatter={(d: string) => d.slice(5)} minTickGap={30} fontSize={11} />
            <YAxis fontSize={11} width={36} allowDecimals={false} label={{ value: "h", angle: 0, position: "insideTopLeft", fontSize: 11 }} />
            <Tooltip formatter={(v) => [`${Number(v).toFixed(2)} h`, "observable"]} labelFormatter={(d) => `night of ${d}`} />
            <Bar dataKey="hours" isAnimationActive={false}>
              {data.map((d) => (
                <Cell key={d.date} fill={moonColours[d.moonCategory]} />
              ))}
            </Bar>
          </BarChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="mt-1 flex flex-wrap gap-4 text-xs text-slate-600">
        Observable hours per night above the airmass limit in astronomical darkness, coloured by the night's moon category:
        {(Object.keys(moonColours) as MoonCategory[]).map((c) => (
          <span key={c} className="inline-flex items-center gap-1">
            <span className="inline-block h-3 w-3 rounded-sm" style={{ background: moonColours[c] }} /> {c}
          </span>
        ))}
      </figcaption>
    </figure>
  );
}

const hhmm = (iso: string) => iso.slice(11, 16);

export function AltitudeChart({
  points,
  minAltitudeDeg,
  darkStart,
  darkEnd,
}: {
  points: { time: string; targetAltDeg: number; sunAltDeg: number; moonAltDeg: number }[];
  minAltitudeDeg: number;
  darkStart: string | null;
  darkEnd: string | null;
}) {
  const data = points.map((p) => ({ ...p, t: Date.parse(p.time) }));
  if (!data.length) return null;
  const first = data[0].t;
  const last = data[data.length - 1].t;
  const ds = darkStart ? Date.parse(darkStart) : null;
  const de = darkEnd ? Date.parse(darkEnd) : null;
  return (
    <figure>
      <div className="h-64 w-full">
        <ResponsiveContainer width="100%" height="100%">
          <LineChart data={data} margin={{ top: 5, right: 10, bottom: 5, left: 0 }}>
            <CartesianGrid strokeDasharray="3 3" vertical={false} />
            {ds !== null && de !== null ? (
              <>
                <ReferenceArea x1={first} x2={ds} fill="#e8a849" fillOpacity={0.18} ifOverflow="hidden" />
                <ReferenceArea x1={de} x2={last} fill="#e8a849" fillOpacity={0.18} ifOverflow="hidden" />
              </>
            ) : (
              <ReferenceArea x1={first} x2={last} fill="#e8a849" fillOpacity={0.18} />
            )}
            <XAxis dataKey="t" type="number" domain={[first, last]} scale="time" ticks={wholeHourTicks(first, last)} tickFormatter={(t: number) => hhmm(new Date(t).toISOString())} fontSize={11} />
            <YAxis domain={[0, 90]} allowDataOverflow ticks={ALTITUDE_TICKS} fontSize={11} width={40} unit="°" />
            <Tooltip labelFormatter={(t) => `${new Date(Number(t)).toISOString().slice(0, 16).replace("T", " ")} UTC`} formatter={(v, name) => [`${Number(v).toFixed(1)}°`, name]} />
            <ReferenceLine y={minAltitudeDeg} stroke="#b91c1c" strokeDasharray="6 3" label={{ value: `airmass limit (${minAltitudeDeg.toFixed(1)}°)`, position: "insideTopRight", fontSize: 11, fill: "#b91c1c" }} />
            <ReferenceLine y={0} stroke="#64748b" />
            <Line type="monotone" dataKey="targetAltDeg" name="target" stroke="#1e3a5f" strokeWidth={2} dot={false} isAnimationActive={false} />
            <Line type="monotone" dataKey="moonAltDeg" name="Moon" stroke="#7c8aa0" strokeDasharray="4 2" dot={false} isAnimationActive={false} />
            <Line type="monotone" dataKey="sunAltDeg" name="Sun" stroke="#d98e2b" dot={false} isAnimationActive={false} />
            <Legend />
          </LineChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="mt-1 text-xs text-slate-600">
        Altitude (geometric, above the horizon) against UTC. Shaded: Sun above −18° (twilight or day). Dashed red: the observation's airmass limit.
      </figcaption>
    </figure>
  );
}

export function ParallaxFactorChart({
  curve,
  epochs,
}: {
  curve: { date: string; ra: number; dec: number }[];
  epochs: { date: string; parallaxFactorRa: number; parallaxFactorDec: number }[];
}) {
  const toT = (d: string) => Date.parse(`${d}T00:00:00Z`);
  const data = [
    ...curve.map((c) => ({ t: toT(c.date), ra: c.ra, dec: c.dec })),
    ...epochs.map((e) => ({ t: toT(e.date), epochRa: e.parallaxFactorRa, epochDec: e.parallaxFactorDec })),
  ].sort((a, b) => a.t - b.t);
  const ticks = data.length ? halfYearTicks(data[0].t, data[data.length - 1].t) : [];
  return (
    <figure>
      <div className="h-56 w-full">
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={data} margin={{ top: 5, right: 10, bottom: 5, left: 0 }}>
            <CartesianGrid strokeDasharray="3 3" vertical={false} />
            <XAxis dataKey="t" type="number" scale="time" domain={["dataMin", "dataMax"]} ticks={ticks} tickFormatter={(t: number) => new Date(t).toISOString().slice(0, 7)} fontSize={11} />
            <YAxis domain={[-1.1, 1.1]} ticks={PARALLAX_FACTOR_TICKS} tickFormatter={(v: number) => v.toFixed(1)} fontSize={11} width={36} />
            <Tooltip labelFormatter={(t) => new Date(Number(t)).toISOString().slice(0, 10)} formatter={(v, name) => [Number(v).toFixed(3), name]} />
            <Line dataKey="ra" name="f(α*)" stroke="#2b4f7e" dot={false} connectNulls isAnimationActive={false} />
            <Line dataKey="dec" name="f(δ)" stroke="#d98e2b" dot={false} connectNulls isAnimationActive={false} />
            <Scatter dataKey="epochRa" name="epochs, f(α*)" fill="#13213a" isAnimationActive={false} />
            <Scatter dataKey="epochDec" name="epochs, f(δ)" fill="#b45309" isAnimationActive={false} />
            <Legend />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="mt-1 text-xs text-slate-600">Parallax factors over the baseline (from the Earth's barycentric position) and the epochs placed on them.</figcaption>
    </figure>
  );
}
