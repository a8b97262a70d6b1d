import { useState, type FormEvent, type ReactNode } from "react";
import type { z } from "zod";
import { fieldErrors, type FieldErrors } from "~/lib/forms";

/**
 * Checks a form with the same zod schema the action uses, before it is sent: on failure the
 * submission is stopped and the messages shown; what was typed stays in the fields.
 */
export function useClientCheck(schema: z.ZodType, serverErrors: FieldErrors | undefined) {
  const [clientErrors, setClientErrors] = useState<FieldErrors | null>(null);
  function onSubmit(event: FormEvent<HTMLFormElement>) {
    const submitter = (event.nativeEvent as SubmitEvent).submitter as HTMLButtonElement | null;
    if (submitter?.dataset.noCheck !== undefined) return;
    const values = Object.fromEntries(new FormData(event.currentTarget, submitter));
    const parsed = schema.safeParse(values);
    if (parsed.success) {
      setClientErrors(null);
      return;
    }
    event.preventDefault();
    const errors = fieldErrors(parsed.error);
    setClientErrors(errors);
    const form = event.currentTarget;
    const first = Object.keys(errors)[0];
    requestAnimationFrame(() => {
      const el = (form.elements.namedItem(first) ?? document.getElementsByName(first)[0]) as HTMLElement | null;
      el?.focus?.();
    });
  }
  return { errors: clientErrors ?? serverErrors ?? {}, onSubmit };
}

type Value = string | number | null | undefined;

const str = (v: Value) => (v === null || v === undefined ? "" : String(v));

export function fieldId(prefix: string, name: string) {
  return `${prefix}-${name}`.replace(/[^A-Za-z0-9_-]/g, "-");
}

export function TextField({
  prefix,
  name,
  label,
  defaultValue,
  error,
  hint,
  list,
  placeholder,
  className,
}: {
  prefix: string;
  name: string;
  label: string;
  defaultValue?: Value;
  error?: string;
  hint?: ReactNode;
  list?: string;
  placeholder?: string;
  className?: string;
}) {
  const id = fieldId(prefix, name);
  return (
    <div className={className}>
      <label htmlFor={id}>{label}</label>
      <input
        id={id}
        name={name}
        className="input"
        defaultValue={str(defaultValue)}
        list={list}
        placeholder={placeholder}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : hint ? `${id}-hint` : undefined}
      />
      <Message id={id} error={error} hint={hint} />
    </div>
  );
}

/** A number as typed (text, so nothing is rounded or dropped by the browser), with its unit beside it. */
export function NumberField({
  prefix,
  name,
  label,
  unit,
  defaultValue,
  error,
  hint,
  className,
}: {
  prefix: string;
  name: string;
  label: string;
  unit?: ReactNode;
  defaultValue?: Value;
  error?: string;
  hint?: ReactNode;
  className?: string;
}) {
  const id = fieldId(prefix, name);
  return (
    <div className={className}>
      <label htmlFor={id}>{label}</label>
      <div className="mt-1 flex items-stretch">
        <input
          id={id}
          name={name}
          inputMode="decimal"
          autoComplete="off"
          className={`input mt-0 min-w-0 flex-1 text-right tabular-nums ${unit ? "rounded-r-none" : ""}`}
          defaultValue={str(defaultValue)}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? `${id}-error` : hint ? `${id}-hint` : unit ? `${id}-unit` : undefined}
        />
        {unit ? (
          <span
            id={`${id}-unit`}
            className="inline-flex items-center rounded-r-md border border-l-0 border-slate-300 bg-slate-50 px-2.5 text-sm whitespace-nowrap text-slate-600"
          >
            {unit}
          </span>
        ) : null}
      </div>
      <Message id={id} error={error} hint={hint} />
    </div>
  );
}

export function Message({ id, error, hint }: { id: string; error?: string; hint?: ReactNode }) {
  if (error) {
    return (
      <p id={`${id}-error`} className="field-error" role="alert">
        {error}
      </p>
    );
  }
  return hint ? (
    <p id={`${id}-hint`} className="mt-1 text-xs text-slate-500">
      {hint}
    </p>
  ) : null;
}

export function FormError({ error }: { error?: string }) {
  return error ? (
    <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800">
      {error}
    </p>
  ) : null;
}

export function Saved({ children }: { children: ReactNode }) {
  return (
    <p role="status" className="rounded-md border border-emerald-200 bg-emerald-50 px-3 py-2 text-sm text-emerald-800">
      {children}
    </p>
  );
}

/** Where the action's errors and typed values live, per form on a page with several. */
export interface FormResult {
  ok: boolean;
  intent?: string;
  rowId?: number;
  errors?: FieldErrors;
  values?: Record<string, string>;
}

export function resultFor(data: unknown, intent: string, rowId?: number): FormResult | undefined {
  const result = data as FormResult | undefined;
  if (!result || result.intent !== intent) return undefined;
  if (rowId !== undefined && result.rowId !== rowId) return undefined;
  return result;
}
