// The box of a CSV import: text pasted in or read from a local file (the refused rows come back in it to fix).
import { useRef, useState, type ReactNode } from "react";

const megabytes = (bytes: number) => `${Math.round(bytes / 1_000_000)} MB`;

/**
 * The CSV's textarea (posted as `name`, `csv` unless told) with its message, and a "choose a file"
 * button that reads a file of at most `maxBytes` into the box for a look before importing;
 * `children` (the submit button) end the button row.
 */
export function CsvTextBox({
  id,
  name = "csv",
  label,
  placeholder,
  value,
  onChange,
  error,
  maxBytes,
  children,
}: {
  id: string;
  name?: string;
  label: string;
  placeholder: string;
  value: string;
  onChange: (text: string) => void;
  error?: string;
  maxBytes: number;
  children?: ReactNode;
}) {
  const [fileNote, setFileNote] = useState<string | null>(null);
  const fileRef = useRef<HTMLInputElement>(null);
  const errorId = `${id}-error`;
  return (
    <>
      <div>
        <label htmlFor={id}>{label}</label>
        <textarea
          id={id}
          name={name}
          rows={8}
          spellCheck={false}
          className="input font-mono text-sm"
          placeholder={placeholder}
          value={value}
          onChange={(e) => onChange(e.target.value)}
          aria-invalid={error ? true : undefined}
          aria-describedby={error ? errorId : undefined}
        />
        {error ? <p id={errorId} className="field-error" role="alert">{error}</p> : null}
      </div>
      <div className="flex flex-wrap items-center gap-3">
        <label htmlFor={`${id}-file`} className="btn-quiet">Choose a CSV file…</label>
        <input
          id={`${id}-file`}
          ref={fileRef}
          type="file"
          accept=".csv,text/csv,text/plain"
          className="sr-only"
          onChange={async (e) => {
            const f = e.target.files?.[0];
            if (!f) return;
            if (f.size > maxBytes) {
              setFileNote(`${f.name} is larger than ${megabytes(maxBytes)}; split it.`);
              return;
            }
            onChange(await f.text());
            setFileNote(`Read ${f.name}; check it in the box, then import.`);
            if (fileRef.current) fileRef.current.value = "";
          }}
        />
        {fileNote ? <span className="text-sm text-slate-600">{fileNote}</span> : null}
        {children}
      </div>
    </>
  );
}
