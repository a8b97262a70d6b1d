import { zodResolver } from "@hookform/resolvers/zod";
import { get, useForm, useWatch } from "react-hook-form";
import { Form, useNavigation, useSubmit } from "react-router";
import type { z } from "zod";
import { clearFractionsSchema, MONTH_NAMES } from "~/lib/schemas/office";
import type { FormResult } from "./fields";
import { valueText } from "~/lib/forms";

type In = z.input<typeof clearFractionsSchema>;
type Out = z.output<typeof clearFractionsSchema>;

const percentText = (fraction: number | null) => (fraction === null ? "" : String(Math.round(fraction * 1000) / 10));

/**
 * Twelve percentages of expected clear nights, with a bar per month that follows what is typed.
 * Checked in the browser with the action's own schema; the typed values come back on a refusal.
 */
export function ClearFractionsForm({ months, result }: { months: { month: number; clearFraction: number | null }[]; result?: FormResult }) {
  const submit = useSubmit();
  const busy = useNavigation().state !== "idle";
  const typed = result && !result.ok ? result.values : undefined;
  const defaults = Object.fromEntries(months.map((m) => [`m${m.month}`, valueText(typed, `m${m.month}`) ?? percentText(m.clearFraction)])) as In;
  const { register, handleSubmit, control, formState } = useForm<In, unknown, Out>({ resolver: zodResolver(clearFractionsSchema), defaultValues: defaults });
  const watched = useWatch({ control }) as Record<string, string | undefined>;
  const error = (name: string): string | undefined => (get(formState.errors, name) as { message?: string } | undefined)?.message ?? result?.errors?.[name];
  const onSubmit = handleSubmit((_values, event) => {
    const form = (event?.target as HTMLElement).closest("form") as HTMLFormElement;
    const fd = new FormData(form);
    fd.set("intent", "clearFractions");
    submit(fd, { method: "post" });
  });
  return (
    <Form method="post" noValidate onSubmit={onSubmit} className="space-y-4" aria-label="Expected clear nights">
      <input type="hidden" name="intent" value="clearFractions" />
      {result?.errors?.form ? <p role="alert" className="field-error">{result.errors.form}</p> : null}
      <div className="grid grid-cols-3 gap-3 sm:grid-cols-6 lg:grid-cols-12">
        {MONTH_NAMES.map((name, i) => {
          const field = `m${i + 1}` as const;
          const raw = Number(String(watched[field] ?? "").trim());
          const shown = String(watched[field] ?? "").trim() !== "" && Number.isFinite(raw) ? Math.min(100, Math.max(0, raw)) : null;
          return (
            <div key={field} className="flex flex-col items-stretch">
              <div className="relative h-24 rounded bg-slate-100" aria-hidden>
                {shown === null ? (
                  <span className="absolute inset-x-0 bottom-1 text-center text-[10px] text-slate-500">not set</span>
                ) : (
                  <div className="absolute inset-x-1 bottom-0 rounded-t bg-sky-600" style={{ height: `${shown}%` }} data-testid={`clear-bar-${i + 1}`} />
                )}
              </div>
              <label htmlFor={`clear-${field}`} className="mt-1 text-xs">{name.slice(0, 3)} (%)</label>
              <input
                id={`clear-${field}`}
                inputMode="decimal"
                className="input text-right"
                aria-label={`${name} clear nights (%)`}
                aria-invalid={error(field) ? true : undefined}
                aria-describedby={error(field) ? `clear-${field}-error` : undefined}
                defaultValue={defaults[field] as string}
                {...register(field)}
              />
              {error(field) ? <p id={`clear-${field}-error`} role="alert" className="field-error">{error(field)}</p> : null}
            </div>
          );
        })}
      </div>
      <button className="btn" disabled={busy}>Save the clear nights</button>
    </Form>
  );
}
