import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect, useRef, useState } from "react";
import { useForm } from "react-hook-form";
import { data, useActionData, useFetcher } from "react-router";
import { Field, inputProps } from "~/components/Field";
import { useWorkspace } from "~/components/workspace";
import { fixed } from "~/lib/format";
import { formatDec, formatRa } from "~/lib/astro/coordinates";
import { requireUser } from "~/lib/auth/auth.server";
import { fieldErrors, issueLine, parseId, readForm } from "~/lib/forms";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { formValues, proposalIdParam, refusalResponse } from "~/lib/proposals/routes.server";
import { createTarget, deleteTarget, importTargetsCsv, listTargets } from "~/lib/proposals/targets.server";
import { updateTarget } from "~/lib/proposals/targets.server";
import { BANDS } from "~/lib/astro/bands";
import { csvImportSchema, targetSchema } from "~/lib/schemas/proposals";
import { CSV_COLUMNS, refusedCsvText } from "~/lib/proposals/target-csv";
import type { Route } from "./+types/proposals.$proposalId.targets";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { targets: await listTargets({ user, proposalId: proposalIdParam(params) }) };
}

const MAX_UPLOAD_BYTES = 2_000_000;

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await getProposalForUser({ proposalId, user }); // a stranger gets the 404 before any parsing
  const form = await readForm(request);
  const file = form.get("file");
  const values = formValues(form) as Record<string, string>;
  delete (values as Record<string, unknown>).file;
  const intent = values.intent;
  try {
    if (intent === "import") {
      let csv = values.csv ?? "";
      if (typeof csv === "string" && csv.trim() === "" && file instanceof File && file.size > 0) {
        if (file.size > MAX_UPLOAD_BYTES) return data({ ok: false as const, intent, errors: { csv: "That file is larger than 2 MB; split it." } as Record<string, string>, values }, { status: 400 });
        csv = await file.text();
      }
      const parsed = csvImportSchema.safeParse({ csv });
      if (!parsed.success) return data({ ok: false as const, intent, errors: fieldErrors(parsed.error), values }, { status: 400 });
      const { report, saved } = await importTargetsCsv({ user, proposalId, csv: parsed.data.csv });
      if (report.error) return data({ ok: false as const, intent, errors: { csv: report.error } as Record<string, string>, values: { csv } }, { status: 400 });
      return { ok: true as const, intent, saved, report, remaining: refusedCsvText(report), errors: {} as Record<string, string>, values: { csv } };
    }
    if (intent === "create" || intent === "update") {
      const parsed = targetSchema.safeParse(values);
      if (!parsed.success) return data({ ok: false as const, intent, errors: fieldErrors(parsed.error), values }, { status: 400 });
      if (intent === "create") await createTarget({ user, proposalId, input: parsed.data });
      else await updateTarget({ user, proposalId, targetId: parseId(values.targetId, "form", "target id"), input: parsed.data });
      return { ok: true as const, intent, message: `${parsed.data.name} ${intent === "create" ? "added" : "saved"}.`, errors: {} as Record<string, string>, values };
    }
    if (intent === "delete") {
      const { name, observations } = await deleteTarget({ user, proposalId, targetId: parseId(values.targetId, "form", "target id") });
      return { ok: true as const, intent, message: `${name} deleted${observations ? ` with its ${observations} observation${observations === 1 ? "" : "s"}` : ""}.`, errors: {} as Record<string, string>, values };
    }
    return data({ ok: false as const, intent, errors: { form: "Unknown action." } as Record<string, string>, values }, { status: 400 });
  } catch (error) {
    const refused = refusalResponse(error, values);
    return data({ ...refused.data, intent }, { status: refused.init?.status ?? 400 });
  }
}

type TargetRow = Route.ComponentProps["loaderData"]["targets"][number];
const emptyTarget = { name: "", ra: "", dec: "", pmra: "", pmdec: "", mag_U: "", mag_B: "", mag_V: "", mag_R: "", mag_I: "", magnitude: "", band: "", notes: "" };

function formOf(t: TargetRow) {
  const s = (v: number | null | undefined) => (v === null || v === undefined ? "" : String(v));
  const m = t.magnitudes;
  return {
    name: t.name, ra: formatRa(t.raDeg, 4), dec: formatDec(t.decDeg, 3), pmra: s(t.pmRaMasPerYr), pmdec: s(t.pmDecMasPerYr),
    mag_U: s(m.U), mag_B: s(m.B), mag_V: s(m.V), mag_R: s(m.R), mag_I: s(m.I), magnitude: "", band: "", notes: t.notes ?? "",
  };
}

function magnitudesText(m: Record<string, number>) {
  const parts = BANDS.filter((b) => m[b] !== undefined).map((b) => `${b} ${m[b].toFixed(2)}`);
  return parts.length ? parts.join(" · ") : "—";
}

function TargetForm({ editing, onDone }: { editing: TargetRow | null; onDone: () => void }) {
  const fetcher = useFetcher<typeof action>();
  const pageAnswer = useActionData<typeof action>();
  const answer = fetcher.data ?? pageAnswer;
  const result = answer && (answer.intent === "create" || answer.intent === "update") ? answer : undefined;
  const { register, handleSubmit, formState, reset } = useForm({
    resolver: zodResolver(targetSchema),
    defaultValues: editing ? formOf(editing) : result && !result.ok ? { ...emptyTarget, ...(result.values as Record<string, string>) } : emptyTarget,
  });
  useEffect(() => {
    if (result?.ok && fetcher.state === "idle") {
      reset(emptyTarget);
      onDone();
    }
  }, [result, fetcher.state, reset, onDone]);
  const serverErrors = result && !result.ok ? result.errors : {};
  const error = (f: keyof typeof emptyTarget | "form") => (f !== "form" ? formState.errors[f]?.message : undefined) ?? serverErrors[f];
  const field = (name: keyof typeof emptyTarget, label: string, hint?: string, extra?: object) => (
    <Field label={label} id={`t-${name}`} error={error(name)} hint={hint}>
      <input {...inputProps(`t-${name}`, error(name))} {...extra} {...register(name)} />
    </Field>
  );
  return (
    <fetcher.Form method="post" noValidate className="card space-y-4" onSubmit={handleSubmit((_, e) => fetcher.submit(e?.target as HTMLFormElement))}>
      <h2>{editing ? `Edit ${editing.name}` : "Add a target"}</h2>
      <input type="hidden" name="intent" value={editing ? "update" : "create"} />
      {editing ? <input type="hidden" name="targetId" value={editing.id} /> : null}
      {error("form") ? <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800">{error("form")}</p> : null}
      <div className="grid gap-4 md:grid-cols-3">
        {field("name", "Name")}
        {field("ra", "RA (ICRS, J2000)", "hh:mm:ss.s or degrees", { spellCheck: false })}
        {field("dec", "Dec (ICRS, J2000)", "±dd:mm:ss or degrees", { spellCheck: false })}
        {field("pmra", "μα* (mas/yr)", "includes cos δ; optional", { inputMode: "decimal" })}
        {field("pmdec", "μδ (mas/yr)", "optional", { inputMode: "decimal" })}
      </div>
      <fieldset>
        <legend className="text-sm font-semibold">Magnitudes (Vega), one per band you know</legend>
        <p className="text-xs text-slate-600">An observation in a band left empty is computed from the nearest band given, and the feasibility sheet says so.</p>
        <div className="mt-2 grid grid-cols-3 gap-3 sm:grid-cols-5">
          {BANDS.map((b) => <div key={b}>{field(`mag_${b}`, b, undefined, { inputMode: "decimal" })}</div>)}
        </div>
      </fieldset>
      {field("notes", "Notes", "optional: finding notes, priority…")}
      <div className="flex gap-2">
        <button type="submit" className="btn" disabled={fetcher.state !== "idle"}>{editing ? "Save the target" : "Add the target"}</button>
        {editing ? <button type="button" className="btn-quiet" onClick={onDone}>Cancel</button> : null}
      </div>
    </fetcher.Form>
  );
}

function CsvImport() {
  const fetcher = useFetcher<typeof action>();
  const pageAnswer = useActionData<typeof action>();
  const answer = fetcher.data ?? pageAnswer;
  const initial = answer?.intent === "import" ? (answer.ok ? (answer.remaining ?? "") : String((answer.values as Record<string, string>).csv ?? "")) : "";
  const [text, setText] = useState(initial);
  const [fileNote, setFileNote] = useState<string | null>(null);
  const fileRef = useRef<HTMLInputElement>(null);
  const result = answer?.intent === "import" ? answer : undefined;
  useEffect(() => {
    if (fetcher.state !== "idle" || !result) return;
    if (result.ok) setText(result.remaining ?? "");
  }, [result, fetcher.state]);
  const error = result && !result.ok ? (result.errors.csv ?? result.errors.form) : undefined;
  const report = result?.ok ? result.report : null;
  const refused = report ? report.rows.filter((r) => !r.ok) : [];
  return (
    <section className="card space-y-3" aria-labelledby="csv-title">
      <h2 id="csv-title">Import targets from CSV</h2>
      <p className="text-sm text-slate-600">
        A header row with the columns <code>{CSV_COLUMNS.join(", ")}</code> (name, ra and dec required; the others may be empty), then one row per target. RA and Dec
        sexagesimal (05:12:33.4, +21:04:12) or in degrees; proper motions in mas/yr (μα* includes cos δ). Rows with problems are listed and kept below to fix and import again; duplicates (same name, or within 1″) are refused.
      </p>
      <fetcher.Form method="post" encType="multipart/form-data" noValidate className="space-y-3">
        <input type="hidden" name="intent" value="import" />
        <div>
          <label htmlFor="csv">CSV text</label>
          <textarea
            id="csv"
            name="csv"
            rows={8}
            spellCheck={false}
            className="input font-mono text-sm"
            placeholder={"name,ra,dec,pmra,pmdec,mag_V,mag_R\nField star 1,05:12:33.4,+21:04:12,1.2,-3.4,15.2,14.8"}
            value={text}
            onChange={(e) => setText(e.target.value)}
            aria-invalid={error ? true : undefined}
            aria-describedby={error ? "csv-error" : undefined}
          />
          {error ? <p id="csv-error" className="field-error" role="alert">{error}</p> : null}
        </div>
        <div className="flex flex-wrap items-center gap-3">
          <label htmlFor="csv-file" className="btn-quiet">Choose a CSV file…</label>
          <input
            id="csv-file"
            ref={fileRef}
            type="file"
            accept=".csv,text/csv,text/plain"
            className="sr-only"
            onChange={async (e) => {
              const f = e.target.files?.[0];
              if (!f) return;
              if (f.size > MAX_UPLOAD_BYTES) {
                setFileNote(`${f.name} is larger than 2 MB; split it.`);
                return;
              }
              setText(await f.text());
              setFileNote(`Read ${f.name}; check it below, then import.`);
              if (fileRef.current) fileRef.current.value = "";
            }}
          />
          {fileNote ? <span className="text-sm text-slate-600">{fileNote}</span> : null}
          <button type="submit" className="btn ml-auto" disabled={fetcher.state !== "idle"}>{fetcher.state !== "idle" ? "Importing…" : "Import"}</button>
        </div>
      </fetcher.Form>
      {report ? (
        <div className="space-y-2" role="status">
          <p className="text-sm">
            <strong className="text-emerald-800">{result?.ok ? result.saved : 0} accepted and saved</strong>
            {refused.length ? <>, <strong className="text-red-800">{refused.length} refused</strong> (kept in the box above to fix and import again)</> : ", none refused"}.
          </p>
          <div className="overflow-x-auto rounded-md border border-slate-200">
            <table className="table-base" aria-label="Import report">
              <thead><tr><th>Line</th><th>Row</th><th>Result</th></tr></thead>
              <tbody>
                {report.rows.map((r) => (
                  <tr key={r.line} className={r.ok ? "" : "bg-red-50/60"}>
                    <td className="tabular-nums">{r.line}</td>
                    <td className="font-mono text-xs break-all">{r.text}</td>
                    <td>
                      {r.ok ? (
                        <span className="text-emerald-800">accepted</span>
                      ) : (
                        <ul className="text-red-800">
                          {r.problems.map((p, i) => <li key={i}>{issueLine(p.field, p.message)}</li>)}
                        </ul>
                      )}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </div>
      ) : null}
    </section>
  );
}

function DeleteButton({ target }: { target: TargetRow }) {
  const fetcher = useFetcher<typeof action>();
  const error = fetcher.data && !fetcher.data.ok ? Object.values(fetcher.data.errors)[0] : null;
  return (
    <fetcher.Form
      method="post"
      className="inline"
      onSubmit={(e) => {
        const more = target.observations ? ` and its ${target.observations} observation${target.observations === 1 ? "" : "s"}` : "";
        if (!confirm(`Delete ${target.name}${more}?`)) e.preventDefault();
      }}
    >
      <input type="hidden" name="intent" value="delete" />
      <input type="hidden" name="targetId" value={target.id} />
      <button type="submit" className="btn-quiet" aria-label={`Delete ${target.name}`}>Delete</button>
      {error ? <span role="alert" className="ml-1 text-xs text-red-700">{error}</span> : null}
    </fetcher.Form>
  );
}

export default function Targets({ loaderData }: Route.ComponentProps) {
  const workspace = useWorkspace();
  const [editing, setEditing] = useState<TargetRow | null>(null);
  const { targets } = loaderData;
  return (
    <div className="space-y-5">
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="table-base">
          <thead>
            <tr>
              <th>Name</th><th>RA</th><th>Dec</th><th className="text-right">μα* (mas/yr)</th><th className="text-right">μδ (mas/yr)</th><th>Magnitudes</th><th className="text-right">Obs.</th>
              {workspace.editable ? <th /> : null}
            </tr>
          </thead>
          <tbody>
            {targets.map((t) => (
              <tr key={t.id} className={editing?.id === t.id ? "bg-dusk-100/60" : "hover:bg-night-50"}>
                <td className="font-semibold">{t.name}</td>
                <td className="font-mono text-xs whitespace-nowrap">{formatRa(t.raDeg)}</td>
                <td className="font-mono text-xs whitespace-nowrap">{formatDec(t.decDeg)}</td>
                <td className="text-right tabular-nums">{fixed(t.pmRaMasPerYr, 2)}</td>
                <td className="text-right tabular-nums">{fixed(t.pmDecMasPerYr, 2)}</td>
                <td className="tabular-nums whitespace-nowrap">{magnitudesText(t.magnitudes)}</td>
                <td className={`text-right tabular-nums ${t.observations ? "" : "text-amber-700"}`} title={t.observations ? undefined : "No observation yet"}>{t.observations}</td>
                {workspace.editable ? (
                  <td className="whitespace-nowrap">
                    <button type="button" className="btn-quiet mr-1" onClick={() => setEditing(t)} aria-label={`Edit ${t.name}`}>Edit</button>
                    <DeleteButton target={t} />
                  </td>
                ) : null}
              </tr>
            ))}
            {targets.length === 0 ? (
              <tr><td colSpan={8} className="py-6 text-center text-slate-500">No targets yet: add one below or import a CSV.</td></tr>
            ) : null}
          </tbody>
        </table>
      </div>
      <p className="text-sm text-slate-600">{targets.length} target{targets.length === 1 ? "" : "s"}. Positions ICRS, J2000; proper motions carry them to the date of observation.</p>
      {workspace.editable ? (
        <div className="grid gap-5 xl:grid-cols-2">
          <TargetForm key={editing?.id ?? "new"} editing={editing} onDone={() => setEditing(null)} />
          <CsvImport />
        </div>
      ) : null}
    </div>
  );
}
