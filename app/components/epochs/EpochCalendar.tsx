// The epochs in a month-by-month calendar: executed, lost, still planned, and the re-plan's nights.
export type CalendarMark = { date: string; kind: "executed" | "lost" | "planned" | "replan"; label: string };

const KIND_STYLE: Record<CalendarMark["kind"], string> = {
  executed: "bg-emerald-600 text-white",
  lost: "bg-red-600 text-white",
  planned: "bg-slate-300 text-slate-900",
  replan: "bg-violet-600 text-white",
};
export const KIND_LABEL: Record<CalendarMark["kind"], string> = { executed: "executed", lost: "lost", planned: "planned", replan: "re-plan" };

function monthsBetween(first: string, last: string) {
  const out: string[] = [];
  let y = Number(first.slice(0, 4));
  let m = Number(first.slice(5, 7));
  const ly = Number(last.slice(0, 4));
  const lm = Number(last.slice(5, 7));
  while (y < ly || (y === ly && m <= lm)) {
    out.push(`${y}-${String(m).padStart(2, "0")}`);
    m += 1;
    if (m > 12) {
      m = 1;
      y += 1;
    }
  }
  return out;
}

export function EpochCalendar({ marks }: { marks: CalendarMark[] }) {
  if (marks.length === 0) return <p className="text-sm text-slate-600">No epochs yet.</p>;
  const dates = marks.map((m) => m.date).sort();
  // only the months that hold an epoch (a multi-year baseline would otherwise be mostly empty grids)
  const withEpochs = new Set(dates.map((d) => d.slice(0, 7)));
  const months = monthsBetween(dates[0], dates[dates.length - 1]).filter((m) => withEpochs.has(m));
  const byDate = new Map<string, CalendarMark[]>();
  for (const m of marks) byDate.set(m.date, [...(byDate.get(m.date) ?? []), m]);
  return (
    <div>
      <ul className="mb-2 flex flex-wrap gap-3 text-xs" aria-label="Calendar legend">
        {(Object.keys(KIND_LABEL) as CalendarMark["kind"][]).map((k) => (
          <li key={k} className="flex items-center gap-1"><span className={`inline-block h-3 w-3 rounded-sm ${KIND_STYLE[k]}`} aria-hidden />{KIND_LABEL[k]}</li>
        ))}
      </ul>
      <div className="grid gap-3 sm:grid-cols-3 lg:grid-cols-4" aria-label="Epoch calendar">
        {months.map((month) => {
          const y = Number(month.slice(0, 4));
          const m = Number(month.slice(5, 7));
          const days = new Date(Date.UTC(y, m, 0)).getUTCDate();
          const lead = (new Date(Date.UTC(y, m - 1, 1)).getUTCDay() + 6) % 7; // weeks start on Monday
          return (
            <div key={month} className="rounded border border-slate-200 p-2">
              <p className="mb-1 text-xs font-semibold">{month}</p>
              <div className="grid grid-cols-7 gap-px text-center text-[10px] tabular-nums">
                {["M", "T", "W", "T", "F", "S", "S"].map((d, i) => <span key={i} className="text-slate-500">{d}</span>)}
                {Array.from({ length: lead }, (_, i) => <span key={`l${i}`} />)}
                {Array.from({ length: days }, (_, i) => {
                  const date = `${month}-${String(i + 1).padStart(2, "0")}`;
                  const here = byDate.get(date);
                  const top = here?.[0];
                  return (
                    <span key={date} className={`rounded-sm py-px ${top ? KIND_STYLE[top.kind] : "text-slate-400"}`} title={here?.map((h) => `${date}: ${h.label}`).join("\n")} data-kind={top?.kind}>
                      {i + 1}
                    </span>
                  );
                })}
              </div>
            </div>
          );
        })}
      </div>
    </div>
  );
}
