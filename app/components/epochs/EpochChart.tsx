// Planned against executed epochs on the parallax-factor curve (recharts), loaded in the browser only.
import { CartesianGrid, ComposedChart, Legend, Line, ResponsiveContainer, Scatter, Tooltip, XAxis, YAxis } from "recharts";
import { PARALLAX_FACTOR_TICKS, halfYearTicks } from "~/components/chart-ticks";

export type ChartEpoch = { t: number; ra: number; kind: "executed" | "lost" | "planned" | "replan" };

export function EpochProgressChart({ curve, epochs }: { curve: { date: string; ra: number; dec: number }[]; epochs: ChartEpoch[] }) {
  const rows = [
    ...curve.map((c) => ({ t: Date.parse(`${c.date}T00:00:00Z`), ra: c.ra, dec: c.dec })),
    ...epochs.map((e) => ({ t: e.t, [e.kind]: e.ra })),
  ].sort((a, b) => a.t - b.t);
  const ticks = rows.length ? halfYearTicks(rows[0].t, rows[rows.length - 1].t) : [];
  return (
    <figure>
      <div className="h-64 w-full">
        <ResponsiveContainer width="100%" height="100%">
          <ComposedChart data={rows} margin={{ top: 5, right: 10, bottom: 5, left: 0 }}>
            <CartesianGrid strokeDasharray="3 3" vertical={false} />
            <XAxis dataKey="t" type="number" scale="time" domain={["dataMin", "dataMax"]} ticks={ticks} tickFormatter={(t: number) => new Date(t).toISOString().slice(0, 7)} fontSize={11} />
            <YAxis domain={[-1.1, 1.1]} ticks={PARALLAX_FACTOR_TICKS} tickFormatter={(v: number) => v.toFixed(1)} fontSize={11} width={36} />
            <Tooltip labelFormatter={(t) => new Date(Number(t)).toISOString().slice(0, 10)} formatter={(v, name) => [Number(v).toFixed(3), name]} />
            <Line dataKey="ra" name="f(α*)" stroke="#2b4f7e" dot={false} connectNulls isAnimationActive={false} />
            <Line dataKey="dec" name="f(δ)" stroke="#d98e2b" strokeDasharray="4 3" dot={false} connectNulls isAnimationActive={false} />
            <Scatter dataKey="executed" name="executed" fill="#047857" isAnimationActive={false} />
            <Scatter dataKey="lost" name="lost" fill="#b91c1c" shape="cross" isAnimationActive={false} />
            <Scatter dataKey="planned" name="planned" fill="#94a3b8" isAnimationActive={false} />
            <Scatter dataKey="replan" name="re-plan" fill="#7c3aed" shape="diamond" isAnimationActive={false} />
            <Legend />
          </ComposedChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="mt-1 text-xs text-slate-600">f(α*) of each epoch on the parallax-factor curve (from the Earth's barycentric position); the table below gives both factors of every epoch.</figcaption>
    </figure>
  );
}
