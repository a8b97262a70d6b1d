import { useEffect, useState } from "react";

function parts(ms: number) {
  const s = Math.max(0, Math.floor(ms / 1000));
  return { days: Math.floor(s / 86400), hours: Math.floor((s % 86400) / 3600), minutes: Math.floor((s % 3600) / 60), seconds: s % 60 };
}

const pad = (n: number) => String(n).padStart(2, "0");

/**
 * Time left until `until`. The server renders it for `renderedAt` (so the hydrated HTML matches);
 * after hydration it ticks every second on the browser's clock.
 */
export function Countdown({ until, renderedAt, label }: { until: string; renderedAt: string; label: string }) {
  const [now, setNow] = useState(() => new Date(renderedAt).getTime());
  const [live, setLive] = useState(false);
  useEffect(() => {
    setLive(true);
    setNow(Date.now());
    const timer = setInterval(() => setNow(Date.now()), 1000);
    return () => clearInterval(timer);
  }, []);
  const left = new Date(until).getTime() - now;
  const p = parts(left);
  return (
    <p className="tabular-nums" aria-label={label} data-live={live ? "" : undefined}>
      {left <= 0 ? (
        <span className="font-semibold text-red-700">Passed</span>
      ) : (
        <>
          <span className="text-2xl font-semibold text-night-900">{p.days}</span> <span className="text-sm text-slate-600">d</span>{" "}
          <span className="text-2xl font-semibold text-night-900">{pad(p.hours)}</span> <span className="text-sm text-slate-600">h</span>{" "}
          <span className="text-2xl font-semibold text-night-900">{pad(p.minutes)}</span> <span className="text-sm text-slate-600">min</span>
          {live ? (
            <>
              {" "}
              <span className="text-2xl font-semibold text-night-900">{pad(p.seconds)}</span> <span className="text-sm text-slate-600">s</span>
            </>
          ) : null}
        </>
      )}
    </p>
  );
}
