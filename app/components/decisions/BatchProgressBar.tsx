import { useEffect, useRef } from "react";
import { useFetcher, useRevalidator } from "react-router";
import type { BatchProgress } from "~/lib/decisions/vocabulary";

/**
 * A batch's progress: queued, sent, failed and retrying mails as one bar. While mails are still
 * waiting it asks the progress resource every second; once drained it reloads the page's data.
 */
export function BatchProgressBar({ initial }: { initial: BatchProgress }) {
  const fetcher = useFetcher<BatchProgress>();
  const revalidator = useRevalidator();
  const p = fetcher.data && fetcher.data.id === initial.id ? fetcher.data : initial;
  const wasDone = useRef(initial.done);
  useEffect(() => {
    if (p.done) {
      if (!wasDone.current) revalidator.revalidate();
      wasDone.current = true;
      return;
    }
    wasDone.current = false;
    const timer = setTimeout(() => fetcher.load(`/api/v1/decision-batches/${p.id}`), 1000);
    return () => clearTimeout(timer);
  }, [p, fetcher, revalidator]);
  const share = (n: number) => (p.total === 0 ? 0 : (n / p.total) * 100);
  return (
    <div className="space-y-2" aria-label="Sending progress">
      <div className="flex items-baseline justify-between text-sm">
        <span className="font-semibold">{p.kind === "resend" ? "Letter sent again" : "Sending the decisions"}: {p.letters} letter{p.letters === 1 ? "" : "s"}, {p.total} e-mail{p.total === 1 ? "" : "s"}</span>
        <span data-testid="batch-percent" className="tabular-nums font-semibold">{p.percent} %</span>
      </div>
      <div className="flex h-4 w-full overflow-hidden rounded bg-slate-200" role="progressbar" aria-valuemin={0} aria-valuemax={100} aria-valuenow={p.percent}>
        <div className="bg-emerald-600" style={{ width: `${share(p.sent)}%` }} title="sent" />
        <div className="bg-red-600" style={{ width: `${share(p.failed)}%` }} title="failed" />
        <div className="bg-amber-500" style={{ width: `${share(p.retrying)}%` }} title="retrying" />
      </div>
      <dl className="flex flex-wrap gap-x-6 text-sm" data-testid="batch-counts">
        <div><dt className="inline text-slate-600">Queued </dt><dd className="inline font-semibold tabular-nums">{p.queued}</dd></div>
        <div><dt className="inline text-emerald-700">Sent </dt><dd className="inline font-semibold tabular-nums">{p.sent}</dd></div>
        <div><dt className="inline text-red-700">Failed </dt><dd className="inline font-semibold tabular-nums">{p.failed}</dd></div>
        <div><dt className="inline text-amber-700">Retrying </dt><dd className="inline font-semibold tabular-nums">{p.retrying}</dd></div>
      </dl>
      {!p.done && p.retrying > 0 ? <p className="text-sm text-amber-800">The mail relay is not answering; the queue keeps these and tries again{p.lastError ? ` (last error: ${p.lastError})` : ""}.</p> : null}
      {p.done ? <p role="status" className="text-sm text-emerald-800">{p.failed ? `Done: ${p.failed} e-mail${p.failed === 1 ? "" : "s"} could not be delivered; re-send those letters.` : "Done: every e-mail has been handed to the mail relay."}</p> : null}
    </div>
  );
}
