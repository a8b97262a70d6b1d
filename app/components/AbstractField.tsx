import type { UseFormRegisterReturn } from "react-hook-form";
import { ABSTRACT_WORD_LIMIT, wordCount } from "~/lib/proposals/vocabulary";

/** The abstract with its word count shown as the user types (the limit is checked again on the server). */
export function AbstractField({ value, error, registration, disabled }: { value: string; error?: string; registration: UseFormRegisterReturn; disabled?: boolean }) {
  const words = wordCount(value ?? "");
  const over = words > ABSTRACT_WORD_LIMIT;
  return (
    <div>
      <div className="flex items-baseline justify-between">
        <label htmlFor="abstract">Abstract</label>
        <span id="abstract-count" aria-live="polite" className={`text-xs tabular-nums ${over ? "font-semibold text-red-700" : "text-slate-500"}`}>
          {words} / {ABSTRACT_WORD_LIMIT} words{over ? ` — ${words - ABSTRACT_WORD_LIMIT} over` : ""}
        </span>
      </div>
      <textarea
        id="abstract"
        rows={9}
        className="input"
        disabled={disabled}
        aria-invalid={error || over ? true : undefined}
        aria-describedby={error ? "abstract-error abstract-count" : "abstract-count"}
        {...registration}
      />
      {error ? (
        <p id="abstract-error" className="field-error" role="alert">
          {error}
        </p>
      ) : null}
    </div>
  );
}
