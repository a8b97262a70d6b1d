import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect } from "react";
import { useForm } from "react-hook-form";
import { useActionData, useFetcher } from "react-router";
import type { z } from "zod";
import { Field, inputProps } from "~/components/Field";
import { formatDec, formatRa } from "~/lib/astro/coordinates";
import type { TargetRow } from "~/lib/proposals/targets.server";
import { BANDS } from "~/lib/astro/bands";
import { targetSchema } from "~/lib/schemas/proposals";
import type { TargetActionResult } from "./target-results";
import { valueTexts } from "~/lib/forms";

type TargetFields = z.input<typeof targetSchema>;
const emptyTarget = { name: "", ra: "", dec: "", pmra: "", pmdec: "", mag_U: "", mag_B: "", mag_V: "", mag_R: "", mag_I: "", magnitude: "", band: "", notes: "" };
type FieldName = keyof typeof emptyTarget;

function formOf(t: TargetRow): typeof emptyTarget {
  const s = (v: number | null | undefined) => (v === null || v === undefined ? "" : String(v));
  const m = t.magnitudes;
  return {
    name: t.name, ra: formatRa(t.raDeg, 4), dec: formatDec(t.decDeg, 3), pmra: s(t.pmRaMasPerYr), pmdec: s(t.pmDecMasPerYr),
    mag_U: s(m.U), mag_B: s(m.B), mag_V: s(m.V), mag_R: s(m.R), mag_I: s(m.I), magnitude: "", band: "", notes: t.notes ?? "",
  };
}

/** Add a target, or edit `editing`; the server's messages show beside the fields. */
export function TargetForm({ editing, onDone }: { editing: TargetRow | null; onDone: () => void }) {
  const fetcher = useFetcher<TargetActionResult>();
  const pageAnswer = useActionData<TargetActionResult>();
  const answer = fetcher.data ?? pageAnswer;
  const result = answer && (answer.intent === "create" || answer.intent === "update") ? answer : undefined;
  const { register, handleSubmit, formState, reset } = useForm<TargetFields, unknown, z.output<typeof targetSchema>>({
    resolver: zodResolver(targetSchema),
    defaultValues: editing ? formOf(editing) : result && !result.ok ? { ...emptyTarget, ...valueTexts(result.values) } : emptyTarget,
  });
  useEffect(() => {
    if (result?.ok && fetcher.state === "idle") {
      reset(emptyTarget);
      onDone();
    }
  }, [result, fetcher.state, reset, onDone]);
  const serverErrors = result && !result.ok ? result.errors : {};
  const error = (f: FieldName | "form") => (f !== "form" ? formState.errors[f]?.message : undefined) ?? serverErrors[f] ?? (f === "form" ? serverErrors.targetId : undefined);
  const field = (name: FieldName, label: string, hint?: string, extra?: object) => (
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
