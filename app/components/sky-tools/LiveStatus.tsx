import { STATUS_TEXT, type LiveStatus } from "./live";

/** The tool's state beside its form: computing, up to date, or why the numbers were not recomputed. */
export function LiveStatusLine({ status, failure, other, testId }: { status: LiveStatus; failure: string | null; other: string[]; testId: string }) {
  const bad = status === "refused" || status === "failed";
  return (
    <div className="col-span-full text-sm" aria-live="polite">
      <p data-testid={testId} data-status={status} className={bad ? "font-semibold text-red-800" : status === "computing" ? "text-dusk-500" : "text-emerald-700"}>
        {STATUS_TEXT[status]}
      </p>
      {failure ? <p className="text-red-800">{failure}</p> : null}
      {other.map((m) => (
        <p key={m} className="field-error" role="alert">{m}</p>
      ))}
    </div>
  );
}

/** A select of the observatory's telescopes, with "Custom site" for free coordinates. */
export function TelescopePicker({
  id,
  value,
  onChange,
  telescopes,
  error,
  customLabel = "Custom site (coordinates below)",
}: {
  id: string;
  value: string;
  onChange: (v: string) => void;
  telescopes: { id: number; name: string; siteName: string }[];
  error?: string;
  customLabel?: string;
}) {
  return (
    <div className="col-span-full sm:col-span-2">
      <label htmlFor={id}>Telescope</label>
      <select id={id} className="input" value={value} onChange={(e) => onChange(e.target.value)} aria-invalid={error ? true : undefined} aria-describedby={error ? `${id}-error` : undefined}>
        {telescopes.map((t) => (
          <option key={t.id} value={String(t.id)}>
            {t.name} · {t.siteName}
          </option>
        ))}
        <option value="custom">{customLabel}</option>
      </select>
      {error ? <p id={`${id}-error`} className="field-error" role="alert">{error}</p> : null}
    </div>
  );
}
