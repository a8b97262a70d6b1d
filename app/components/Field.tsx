import type { InputHTMLAttributes, ReactNode } from "react";

/** A labelled input with its message right below it; `aria-invalid` drives the red outline. */
export function Field({
  label,
  error,
  hint,
  children,
  id,
}: {
  label: string;
  error?: string;
  hint?: ReactNode;
  id: string;
  children: ReactNode;
}) {
  return (
    <div>
      <label htmlFor={id}>{label}</label>
      {children}
      {hint && !error ? <p className="mt-1 text-xs text-slate-500">{hint}</p> : null}
      {error ? (
        <p id={`${id}-error`} className="field-error" role="alert">
          {error}
        </p>
      ) : null}
    </div>
  );
}

export function inputProps(id: string, error?: string): InputHTMLAttributes<HTMLInputElement> {
  return {
    id,
    className: "input",
    "aria-invalid": error ? true : undefined,
    "aria-describedby": error ? `${id}-error` : undefined,
  };
}
