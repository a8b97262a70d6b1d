import { zodResolver } from "@hookform/resolvers/zod";
import { createContext, useContext, type ChangeEvent, type FormEvent, type ReactNode } from "react";
import { useForm, type FieldValues, type UseFormRegister } from "react-hook-form";
import { useSubmit, type SubmitOptions } from "react-router";
import type { z } from "zod";
import type { FieldErrors } from "~/lib/forms";

/** The office form's `register`, for the fields below (a field outside an office form is plain). */
const RegisterContext = createContext<UseFormRegister<FieldValues> | null>(null);
export const OfficeFields = RegisterContext.Provider;

/** The field's react-hook-form props (name, ref, onChange, onBlur), or just its name. */
export function useField(name: string, onChange?: (event: ChangeEvent<HTMLInputElement | HTMLSelectElement>) => void) {
  const register = useContext(RegisterContext);
  if (!register) return { name, onChange };
  const field = register(name);
  return {
    ...field,
    onChange: (event: ChangeEvent<HTMLInputElement | HTMLSelectElement>) => {
      onChange?.(event);
      return field.onChange(event);
    },
  };
}

/**
 * An office form on react-hook-form with the action's own zod schema (zodResolver): the fields
 * (wrapped in `<OfficeFields value={register}>`) register themselves and keep their server-rendered
 * default values; on a failed check nothing is sent, the messages show by the fields and the first
 * bad field gets the focus. A valid form is sent as the browser would have sent it (the pressed
 * button's name and value included), through `submit` (a fetcher's, or the page's). A button with
 * `data-no-check` (a delete) is sent unchecked.
 */
export function useOfficeForm<S extends z.ZodType<unknown, FieldValues>>(
  schema: S,
  serverErrors: FieldErrors | undefined,
  submitWith?: (form: FormData, options: SubmitOptions) => unknown,
) {
  const pageSubmit = useSubmit();
  const form = useForm<z.input<S>, unknown, z.output<S>>({ resolver: zodResolver(schema), shouldFocusError: true });
  function onSubmit(event: FormEvent<HTMLFormElement>) {
    const submitter = (event.nativeEvent as SubmitEvent).submitter as HTMLButtonElement | null;
    if (submitter?.dataset.noCheck !== undefined) return;
    const element = event.currentTarget;
    const data = new FormData(element, submitter);
    void form.handleSubmit(() => void (submitWith ?? pageSubmit)(data, { method: "post" }))(event);
  }
  const clientErrors: FieldErrors = {};
  for (const [name, error] of Object.entries(form.formState.errors)) {
    const message = (error as { message?: unknown } | undefined)?.message;
    if (typeof message === "string") clientErrors[name] = message;
  }
  const checked = Object.keys(clientErrors).length > 0;
  return { errors: checked ? clientErrors : (serverErrors ?? {}), onSubmit, register: form.register as unknown as UseFormRegister<FieldValues> };
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
  const field = useField(name);
  return (
    <div className={className}>
      <label htmlFor={id}>{label}</label>
      <input
        id={id}
        {...field}
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
  const field = useField(name);
  return (
    <div className={className}>
      <label htmlFor={id}>{label}</label>
      <div className="mt-1 flex items-stretch">
        <input
          id={id}
          {...field}
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
