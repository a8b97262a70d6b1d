// The Visibility tool's charts (recharts), loaded on demand by VisibilityTool (React.lazy).
import { Bar, BarChart, CartesianGrid, Cell, Line, LineChart, ReferenceArea, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { ALTITUDE_TICKS, wholeHourTicks } from "~/components/chart-ticks";
import { localTime } from "./live";
import type { Curve } from "./VisibilityTool";
import { grouped as fmt } from "~/lib/format";
import { moonColours } from "~/components/moon-colours";

export function AltitudeChart({ curve, limit, timeZone }: { curve: Curve; limit: number; timeZone: string }) {
  const data = curve.points.map((p) => ({ t: Date.parse(p.time), target: p.targetAltDeg, sun: p.sunAltDeg, moon: p.moonAltDeg }));
  const first = data[0]?.t ?? 0;
  const last = data[data.length - 1]?.t ?? 0;
  const darkStart = curve.darkStart ? Date.parse(curve.darkStart) : null;
  const darkEnd = curve.darkEnd ? Date.parse(curve.darkEnd) : null;
  const tick = (t: number) => `${new Date(t).toISOString().slice(11, 16)}`;
  return (
    <ResponsiveContainer width="100%" height="100%">
      <LineChart data={data} margin={{ top: 8, right: 16, bottom: 8, left: 0 }}>
        <CartesianGrid stroke="#e2e8f0" />
        <XAxis dataKey="t" type="number" domain={[first, last]} ticks={wholeHourTicks(first, last)} tickFormatter={tick} scale="time" />
        <YAxis domain={[0, 90]} allowDataOverflow ticks={ALTITUDE_TICKS} unit="°" />
        {darkStart === null || darkEnd === null ? (
          <ReferenceArea x1={first} x2={last} fill="#fbefdc" fillOpacity={0.8} />
        ) : (
          <>
            <ReferenceArea x1={first} x2={darkStart} fill="#fbefdc" fillOpacity={0.8} />
            <ReferenceArea x1={darkEnd} x2={last} fill="#fbefdc" fillOpacity={0.8} />
          </>
        )}
        <ReferenceLine y={limit} stroke="#b91c1c" strokeDasharray="6 4" />
        <Tooltip labelFormatter={(t) => `${tick(Number(t))} UTC · ${localTime(new Date(Number(t)).toISOString(), timeZone)} local`} formatter={(v) => `${fmt(Number(v), 1)}°`} />
        <Line type="monotone" dataKey="target" name="Target" stroke="#1e3a5f" strokeWidth={2.5} dot={false} isAnimationActive={false} />
        <Line type="monotone" dataKey="moon" name="Moon" stroke="#8a9bb0" strokeDasharray="4 3" strokeWidth={2} dot={false} isAnimationActive={false} />
        <Line type="monotone" dataKey="sun" name="Sun" stroke="#d98e2b" strokeWidth={2} dot={false} isAnimationActive={false} />
      </LineChart>
    </ResponsiveContainer>
  );
}

export function HoursChart({ data }: { data: { date: string; hours: number; moonCategory: keyof typeof moonColours }[] }) {
  return (
    <ResponsiveContainer width="100%" height="100%">
      <BarChart data={data} margin={{ top: 8, right: 16, bottom: 8, left: 0 }} barCategoryGap={0}>
        <CartesianGrid stroke="#e2e8f0" vertical={false} />
        <XAxis dataKey="date" tickFormatter={(d: string) => d.slice(5)} minTickGap={24} />
        <YAxis unit=" h" allowDecimals={false} />
        <Tooltip formatter={(v) => `${fmt(Number(v), 2)} h`} />
        <Bar dataKey="hours" isAnimationActive={false}>
          {data.map((d) => (
            <Cell key={d.date} fill={moonColours[d.moonCategory]} />
          ))}
        </Bar>
      </BarChart>
    </ResponsiveContainer>
  );
}
