// The epoch planner's parallax-factor chart (recharts), loaded on demand by EpochTool (React.lazy).
import { CartesianGrid, ComposedChart, Line, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from "recharts";
import { PARALLAX_FACTOR_TICKS, halfYearTicks } from "~/components/chart-ticks";
import type { EpochAnswer } from "./EpochTool";
import { grouped as fmt } from "~/lib/format";

export function ParallaxChart({ plan }: { plan: EpochAnswer }) {
  const curve = plan.parallaxCurve.map((c) => ({ t: Date.parse(c.date), ra: c.ra, dec: c.dec }));
  const points = plan.epochs.map((e) => ({ t: Date.parse(e.time), ra: e.parallaxFactors.ra, dec: e.parallaxFactors.dec }));
  const ts = [...curve, ...points].map((p) => p.t);
  const first = Math.min(...ts);
  const last = Math.max(...ts);
  const month = (t: number) => new Date(t).toISOString().slice(0, 7);
  return (
    <ResponsiveContainer width="100%" height="100%">
      <ComposedChart margin={{ top: 8, right: 16, bottom: 8, left: 0 }}>
        <CartesianGrid stroke="#e2e8f0" />
        <XAxis dataKey="t" type="number" scale="time" domain={[first, last]} ticks={halfYearTicks(first, last)} tickFormatter={month} />
        <YAxis domain={[-1.1, 1.1]} ticks={PARALLAX_FACTOR_TICKS} tickFormatter={(v: number) => fmt(v, 1)} />
        <Tooltip labelFormatter={(t) => new Date(Number(t)).toISOString().slice(0, 10)} formatter={(v) => fmt(Number(v), 3)} />
        <Line data={curve} dataKey="ra" name="f(α*)" stroke="#1e3a5f" dot={false} strokeWidth={2} isAnimationActive={false} />
        <Line data={curve} dataKey="dec" name="f(δ)" stroke="#d98e2b" dot={false} strokeWidth={2} isAnimationActive={false} />
        <Scatter data={points} dataKey="ra" name="epoch f(α*)" fill="#1e3a5f" isAnimationActive={false} />
        <Scatter data={points} dataKey="dec" name="epoch f(δ)" fill="#d98e2b" isAnimationActive={false} />
      </ComposedChart>
    </ResponsiveContainer>
  );
}
