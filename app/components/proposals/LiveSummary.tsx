import { useEffect, useMemo } from "react";
import { useFetcher } from "react-router";
import { secondsPerEpoch } from "~/lib/astro/exposure";
import { fixed, NONE } from "~/lib/format";
import { issueLine } from "~/lib/forms";
import type { ObservationFields, ObservationPageData } from "./observation-results";

type ExposureAnswer = { exposureSeconds?: number; snr?: number; saturated?: boolean; peakPixelElectrons?: number; fullWellE?: number; regime?: string; error?: string; issues?: { path: string; message: string }[] };

/** The live numbers: the science API's exposure calculator, called as the user types (debounced). */
export function LiveSummary({ values, data: d }: { values: ObservationFields; data: ObservationPageData }) {
  const fetcher = useFetcher<ExposureAnswer>();
  const target = d.targets.find((t) => String(t.id) === values.targetId);
  const instrument = d.options.find((o) => String(o.instrumentId) === values.instrumentId);
  const filter = instrument?.filters.find((f) => String(f.id) === values.filterId);
  const num = (v: unknown) => (v === null || v === undefined || String(v).trim() === "" ? NaN : Number(v));
  const request = useMemo(() => {
    if (!target || !instrument || !filter) return { missing: "Choose a target, an instrument and a filter." };
    if (target.magnitude === null) return { missing: `${target.name} has no magnitude: add one on the Targets tab to see exposure times.` };
    const amount = values.mode === "snr" ? num(values.snrGoal) : num(values.exposureSeconds);
    const airmass = num(values.maxAirmass);
    const seeing = num(values.seeingArcsec);
    if (!(amount > 0) || !(airmass >= 1) || !(seeing > 0)) return { missing: "Enter the SNR goal or exposure time, the airmass limit and the seeing." };
    return {
      body: {
        band: filter.band,
        magnitude: target.magnitude,
        ...(values.mode === "snr" ? { snr: amount } : { exposureSeconds: amount }),
        airmass,
        seeingArcsec: seeing,
        moonCategory: values.moonCategory,
        telescopeId: instrument.telescopeId,
        instrumentId: instrument.instrumentId,
      },
    };
  }, [target, instrument, filter, values.mode, values.snrGoal, values.exposureSeconds, values.maxAirmass, values.seeingArcsec, values.moonCategory]);
  const key = JSON.stringify(request);
  useEffect(() => {
    const body = "body" in request ? request.body : undefined;
    if (!body) return;
    const timer = setTimeout(() => fetcher.submit(body, { method: "post", action: "/api/v1/exposure", encType: "application/json" }), 300);
    return () => clearTimeout(timer);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key]);
  const answer = fetcher.data;
  const frames = Number(values.framesPerEpoch) || 0;
  const epochs = Number(values.epochsPerSemester) || 0;
  const perEpoch = answer?.exposureSeconds !== undefined && instrument ? secondsPerEpoch(frames, answer.exposureSeconds, instrument) : null;
  const stale = fetcher.state !== "idle";
  return (
    <aside aria-labelledby="live-title" aria-live="polite" className="card space-y-2 bg-night-50">
      <h2 id="live-title">Live numbers</h2>
      {"missing" in request ? (
        <p className="text-sm text-slate-600">{request.missing}</p>
      ) : answer?.error ? (
        <p role="alert" className="text-sm text-red-800">{answer.issues?.length ? answer.issues.map((i) => issueLine(i.path, i.message)).join("; ") : answer.error}</p>
      ) : answer?.exposureSeconds !== undefined ? (
        <dl className={`grid grid-cols-2 gap-x-4 gap-y-1 text-sm ${stale ? "opacity-60" : ""}`}>
          <dt className="text-slate-600">Exposure per frame</dt>
          <dd data-testid="live-exposure" className="text-right font-semibold tabular-nums">{fixed(answer.exposureSeconds, 1)} s</dd>
          <dt className="text-slate-600">SNR per frame</dt>
          <dd data-testid="live-snr" className="text-right font-semibold tabular-nums">{fixed(answer.snr, 1)}</dd>
          <dt className="text-slate-600">Limited by</dt>
          <dd className="text-right">{answer.regime?.replace(/-/g, " ")}</dd>
          <dt className="text-slate-600">Time per epoch</dt>
          <dd className="text-right tabular-nums">{perEpoch !== null ? `${fixed(perEpoch / 60, 1)} min` : NONE}</dd>
          <dt className="text-slate-600">Per semester ({epochs} epoch{epochs === 1 ? "" : "s"})</dt>
          <dd data-testid="live-hours" className="text-right tabular-nums">{perEpoch !== null ? `${fixed((perEpoch * epochs) / 3600, 2)} h` : NONE}</dd>
          {answer.saturated ? <dd className="col-span-2 font-semibold text-red-800">Saturates: peak {Math.round(answer.peakPixelElectrons ?? 0)} e⁻ ≥ full well {answer.fullWellE} e⁻. Shorten the frames and take more of them.</dd> : null}
        </dl>
      ) : (
        <p className="text-sm text-slate-600">Computing…</p>
      )}
      <p className="text-xs text-slate-500">
        CCD equation at the airmass limit (the worst case), with the {values.moonCategory} sky of the {filter?.band ?? "chosen"} filter
        {target?.band && filter && target.band !== filter.band ? `; the ${target.band} magnitude is used as is in ${filter.band}` : ""}. Time per epoch = frames × (exposure + readout) + acquisition. The
        feasibility sheet adds visibility and the astrometric plan.
      </p>
    </aside>
  );
}
