// The ranking board's RA pressure: for one telescope, requested hours against the dark hours
// the site offers in each one-hour bin of RA over the call's semester, by moon category; a bar
// chart (plain SVG, drawn on the server too) and the table under it.
import { Link } from "react-router";
import { moonCategories as MOONS, type MoonCategory as Moon } from "~/lib/domain";
import { NONE } from "~/lib/format";

type Split = Record<Moon, { darkHours: number; availableDarkHours: number; requestedHours: number }>;

export type RaPressureView = {
  telescopes: { id: number; name: string }[];
  selectedId: number | null;
  error: string | null;
  result: null | {
    telescope: { id: number; name: string };
    site: { latitudeDeg: number; longitudeDeg: number; elevationM: number };
    semester: { start: string; end: string; nights: number };
    darkHours: number;
    availableDarkHours: number;
    requestedHours: number;
    clearFractions: { month: number; clearFraction: number; set: boolean; nights: number }[];
    bins: { raHour: number; darkHours: number; availableDarkHours: number; requestedHours: number; byMoonCategory: Split }[];
    observations: number;
    unplaced: { observationId: number; proposalId: number; code: string | null; hours: number }[];
    failedProposals: { proposalId: number; code: string | null }[];
  };
};

const AVAILABLE_FILL: Record<Moon, string> = { dark: "#1f3a5c", grey: "#5f86b3", bright: "#bcd0e8" };
const REQUESTED_FILL: Record<Moon, string> = { dark: "#a8450c", grey: "#e08a2e", bright: "#f6d19b" };
const MONTHS = ["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"];
const h1 = (x: number) => x.toFixed(1);
/** requests are small beside a bin's dark time: one more digit */
const h2 = (x: number) => x.toFixed(2);

/** A round top for the axis and ticks every 1, 2 or 5 × 10ⁿ, at most six. */
export function hourTicks(max: number): number[] {
  if (!(max > 0)) return [0, 1];
  const raw = max / 5;
  const p = 10 ** Math.floor(Math.log10(raw));
  const step = [1, 2, 5, 10].map((m) => m * p).find((s) => s >= raw) ?? 10 * p;
  const ticks: number[] = [];
  for (let t = 0; t < max + step - 1e-9; t += step) ticks.push(Math.round(t * 1e6) / 1e6);
  return ticks;
}

function Chart({ bins, telescopeName }: { bins: NonNullable<RaPressureView["result"]>["bins"]; telescopeName: string }) {
  const W = 960;
  const H = 320;
  const left = 52;
  const right = 12;
  const top = 14;
  const bottom = 40;
  const plotW = W - left - right;
  const plotH = H - top - bottom;
  const ticks = hourTicks(Math.max(...bins.map((b) => Math.max(b.darkHours, b.requestedHours))));
  const yMax = ticks[ticks.length - 1];
  const y = (v: number) => top + plotH - (v / yMax) * plotH;
  const group = plotW / 24;
  const barW = Math.min(14, group / 2 - 2);
  const stack = (b: (typeof bins)[number], x: number, key: "availableDarkHours" | "requestedHours", fill: Record<Moon, string>, label: string) => {
    let base = 0;
    return MOONS.map((m) => {
      const v = b.byMoonCategory[m][key];
      const rect = v > 0 ? (
        <rect key={`${label}-${m}`} x={x} width={barW} y={y(base + v)} height={Math.max(0.5, y(base) - y(base + v))} fill={fill[m]} stroke="#334155" strokeWidth={0.4}>
          <title>{`RA ${b.raHour}–${b.raHour + 1} h, ${label} ${m} time: ${h1(v)} h`}</title>
        </rect>
      ) : null;
      base += v;
      return rect;
    });
  };
  const totalAvailable = bins.reduce((s, b) => s + b.availableDarkHours, 0);
  const totalRequested = bins.reduce((s, b) => s + b.requestedHours, 0);
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="h-auto w-full" role="img" aria-label={`RA pressure at ${telescopeName}: ${h1(totalRequested)} h requested against ${h1(totalAvailable)} h of expected clear dark time, in 24 one-hour bins of right ascension`}>
      {ticks.map((t) => (
        <g key={t}>
          <line x1={left} x2={W - right} y1={y(t)} y2={y(t)} stroke="#e2e8f0" />
          <text x={left - 6} y={y(t) + 4} textAnchor="end" fontSize={11} fill="#475569">{t}</text>
        </g>
      ))}
      <text x={14} y={top + plotH / 2} fontSize={11} fill="#475569" textAnchor="middle" transform={`rotate(-90 14 ${top + plotH / 2})`}>hours</text>
      {bins.map((b) => {
        const x0 = left + b.raHour * group + (group - 2 * barW - 2) / 2;
        return (
          <g key={b.raHour} data-ra-hour={b.raHour}>
            {b.darkHours > 0 ? (
              <rect x={x0} width={barW} y={y(b.darkHours)} height={y(0) - y(b.darkHours)} fill="none" stroke="#64748b" strokeDasharray="3 2" strokeWidth={0.8}>
                <title>{`RA ${b.raHour}–${b.raHour + 1} h: ${h1(b.darkHours)} h dark before the clear fraction`}</title>
              </rect>
            ) : null}
            {stack(b, x0, "availableDarkHours", AVAILABLE_FILL, "available")}
            {stack(b, x0 + barW + 2, "requestedHours", REQUESTED_FILL, "requested")}
            <text x={left + b.raHour * group + group / 2} y={H - bottom + 15} textAnchor="middle" fontSize={11} fill="#475569">{b.raHour}</text>
          </g>
        );
      })}
      <line x1={left} x2={W - right} y1={y(0)} y2={y(0)} stroke="#475569" />
      <text x={left + plotW / 2} y={H - 6} textAnchor="middle" fontSize={11} fill="#475569">right ascension (h) = local sidereal time at transit</text>
    </svg>
  );
}

function Legend() {
  const swatch = (fill: string, key: string, text: string) => (
    <span key={key} className="inline-flex items-center gap-1">
      <span className="inline-block h-3 w-3 border border-slate-500" style={{ background: fill }} aria-hidden />
      {text}
    </span>
  );
  return (
    <div className="flex flex-wrap gap-x-4 gap-y-1 text-xs text-slate-700">
      <span className="font-semibold">Available (left bar):</span>
      {MOONS.map((m) => swatch(AVAILABLE_FILL[m], `a-${m}`, m))}
      <span className="inline-flex items-center gap-1"><span className="inline-block h-3 w-3 border border-dashed border-slate-500" aria-hidden />before the clear fraction</span>
      <span className="ml-4 font-semibold">Requested (right bar):</span>
      {MOONS.map((m) => swatch(REQUESTED_FILL[m], `r-${m}`, m))}
    </div>
  );
}

export function RaPressure({ view }: { view: RaPressureView }) {
  const r = view.result;
  return (
    <section className="card space-y-3" aria-labelledby="ra-pressure-heading">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <h2 id="ra-pressure-heading">RA pressure{r ? ` at ${r.telescope.name}` : ""}</h2>
        <nav aria-label="Telescope for RA pressure" className="flex flex-wrap items-center gap-2 text-sm">
          <span className="font-semibold text-slate-700" id="ra-telescope-label">Telescope</span>
          {view.telescopes.map((t) => (
            <Link
              key={t.id}
              to={`?telescopeId=${t.id}#ra-pressure-heading`}
              preventScrollReset
              aria-current={t.id === view.selectedId ? "page" : undefined}
              className={t.id === view.selectedId ? "btn" : "btn-quiet"}
            >
              {t.name}
            </Link>
          ))}
        </nav>
      </div>
      {view.error ? <p role="alert" className="field-error text-right">{view.error}</p> : null}
      {r ? (
        <>
          <p className="text-sm text-slate-700">
            Available: the dark time (Sun below −18°) of the {r.semester.nights} nights {r.semester.start} to {r.semester.end} at the site ({r.site.latitudeDeg.toFixed(2)}°, {r.site.longitudeDeg.toFixed(2)}°, {Math.round(r.site.elevationM)} m) during which the local sidereal time lies in each one-hour bin, cut at moonrise and moonset into moon categories, times the telescope's expected clear fraction for the month of each night.
            Requested: each observation's hours in this semester spread over the bins in proportion to its target's observable hours there, counting only time in its moon category or darker ({r.observations} observation{r.observations === 1 ? "" : "s"} on the board).
          </p>
          <p className="text-sm" data-testid="ra-clear-fractions">
            <span className="font-semibold">Clear fraction used: </span>
            {r.clearFractions.map((c, i) => (
              <span key={c.month}>
                {i > 0 ? " · " : ""}
                {MONTHS[c.month - 1]} {c.set ? c.clearFraction.toFixed(2) : <span className="text-amber-800">not set (counted as 1)</span>}
              </span>
            ))}
          </p>
          <p className="text-sm" data-testid="ra-totals">
            Requested <strong>{h1(r.requestedHours)} h</strong> against <strong>{h1(r.availableDarkHours)} h</strong> of expected clear dark time ({h1(r.darkHours)} h dark before the clear fraction).
          </p>
          <Legend />
          <Chart bins={r.bins} telescopeName={r.telescope.name} />
          {r.unplaced.length ? (
            <p className="text-sm text-amber-800">
              Not in the bins (no observable time in their moon category or darker): {r.unplaced.map((u) => `${u.code ?? `proposal ${u.proposalId}`} observation ${u.observationId}, ${h1(u.hours)} h`).join("; ")}.
            </p>
          ) : null}
          {r.failedProposals.length ? (
            <p className="text-sm text-red-800">Left out because their feasibility sheet could not be computed: {r.failedProposals.map((p) => p.code ?? `proposal ${p.proposalId}`).join(", ")}.</p>
          ) : null}
          <div className="overflow-x-auto">
            <table className="table-base" data-testid="ra-table">
              <thead>
                <tr>
                  <th rowSpan={2}>RA (h)</th>
                  <th rowSpan={2}>Dark h</th>
                  <th colSpan={4} className="text-center">Available h (× clear fraction)</th>
                  <th colSpan={4} className="text-center">Requested h</th>
                  <th rowSpan={2}>Requested ÷ available</th>
                </tr>
                <tr>
                  {MOONS.map((m) => <th key={`a-${m}`}>{m}</th>)}
                  <th>all</th>
                  {MOONS.map((m) => <th key={`r-${m}`}>{m}</th>)}
                  <th>all</th>
                </tr>
              </thead>
              <tbody>
                {r.bins.map((b) => {
                  const ratio = b.availableDarkHours > 0 ? b.requestedHours / b.availableDarkHours : null;
                  return (
                    <tr key={b.raHour}>
                      <td>{b.raHour}–{b.raHour + 1}</td>
                      <td>{h1(b.darkHours)}</td>
                      {MOONS.map((m) => <td key={`a-${m}`}>{h1(b.byMoonCategory[m].availableDarkHours)}</td>)}
                      <td className="font-semibold">{h1(b.availableDarkHours)}</td>
                      {MOONS.map((m) => <td key={`r-${m}`}>{h2(b.byMoonCategory[m].requestedHours)}</td>)}
                      <td className="font-semibold">{h2(b.requestedHours)}</td>
                      <td className={ratio !== null && ratio > 1 ? "font-semibold text-red-700" : ""}>
                        {ratio !== null ? `${ratio.toFixed(2)}×` : b.requestedHours > 0 ? "no dark time" : NONE}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
              <tfoot>
                <tr className="font-semibold">
                  <td>all</td>
                  <td>{h1(r.darkHours)}</td>
                  {MOONS.map((m) => <td key={`a-${m}`}>{h1(r.bins.reduce((s, b) => s + b.byMoonCategory[m].availableDarkHours, 0))}</td>)}
                  <td>{h1(r.availableDarkHours)}</td>
                  {MOONS.map((m) => <td key={`r-${m}`}>{h2(r.bins.reduce((s, b) => s + b.byMoonCategory[m].requestedHours, 0))}</td>)}
                  <td>{h2(r.requestedHours)}</td>
                  <td>{r.availableDarkHours > 0 ? `${(r.requestedHours / r.availableDarkHours).toFixed(2)}×` : NONE}</td>
                </tr>
              </tfoot>
            </table>
          </div>
        </>
      ) : null}
    </section>
  );
}
