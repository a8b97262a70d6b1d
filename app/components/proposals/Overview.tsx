import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import { Form, useActionData, useNavigation, useSubmit } from "react-router";
import type { z } from "zod";
import { AbstractField } from "~/components/AbstractField";
import { Field, inputProps } from "~/components/Field";
import { formatUtc as utc } from "~/lib/format";
import { valueList, valueText, type ActionFailure } from "~/lib/forms";
import type { OverviewResult, OverviewValues } from "~/lib/proposals/proposals.server";
import { scienceCategories, scienceCategoryLabel, scienceCategoryValues } from "~/lib/proposals/vocabulary";
import { overviewSchema } from "~/lib/schemas/proposals";

type Conflict = Extract<OverviewResult, { ok: false }>["conflict"];

/** What the summary's action answers: a save, a refusal, or a conflict with a save made meanwhile (409). */
export type OverviewAnswer = (ActionFailure & { conflict?: Conflict }) | { ok: true; intent: "save"; version: number; savedAt: string };

/** The loader's data the form needs. */
export type OverviewPageData = { values: OverviewValues; version: number; semesters: string[]; callSemester: string; editable: boolean };

/** A version of the summary as the form posts it ("Keep my version" sends the user's own again). */
export function toFormData(values: OverviewValues, version: number) {
  const fd = new FormData();
  fd.set("intent", "save");
  fd.set("version", String(version));
  fd.set("title", values.title);
  fd.set("abstract", values.abstract);
  fd.set("scienceCategory", values.scienceCategory ?? "");
  if (values.isMultiSemester) fd.set("isMultiSemester", "on");
  for (const s of values.semestersRequested) fd.append("semestersRequested", s);
  if (values.isTargetOfOpportunity) fd.set("isTargetOfOpportunity", "on");
  return fd;
}

function describe(values: OverviewValues) {
  return [
    ["Title", values.title],
    ["Abstract", values.abstract || "—"],
    ["Science category", scienceCategoryLabel(values.scienceCategory) ?? "—"],
    ["Multi-semester", values.isMultiSemester ? `yes: ${values.semestersRequested.join(", ")}` : "no"],
    ["Target of opportunity", values.isTargetOfOpportunity ? "yes" : "no"],
  ] as const;
}

/** Both versions side by side, with the fields that differ marked. */
export function ConflictPanel({ conflict, onKeepMine, onTakeSaved }: { conflict: Conflict | null; onKeepMine: () => void; onTakeSaved: () => void }) {
  if (!conflict) return null;
  const mine = describe(conflict.mine);
  const saved = describe(conflict.saved);
  return (
    <section role="alert" aria-labelledby="conflict-title" className="rounded-lg border border-amber-400 bg-amber-50 p-4">
      <h2 id="conflict-title">Someone saved the summary while you were editing</h2>
      <p className="mt-1 text-sm text-slate-700">
        {conflict.savedBy ?? "A team member"} saved it at {utc(conflict.savedAt)}. Nothing is lost: your version is still in the form below. Compare, then keep yours (it replaces theirs) or take theirs.
      </p>
      <div className="mt-3 grid gap-3 md:grid-cols-2">
        {[
          { label: "Your version (not saved)", rows: mine, other: saved },
          { label: `Saved version`, rows: saved, other: mine },
        ].map((side) => (
          <div key={side.label} className="rounded-md border border-slate-200 bg-white p-3">
            <h3 className="text-sm font-semibold text-night-900">{side.label}</h3>
            <dl className="mt-2 space-y-2 text-sm">
              {side.rows.map(([k, v], i) => (
                <div key={k} className={v !== side.other[i][1] ? "rounded bg-amber-100/70 px-1" : ""}>
                  <dt className="font-semibold text-slate-600">{k}{v !== side.other[i][1] ? " (differs)" : ""}</dt>
                  <dd className="break-words whitespace-pre-wrap">{v}</dd>
                </div>
              ))}
            </dl>
          </div>
        ))}
      </div>
      <div className="mt-3 flex flex-wrap gap-2">
        <button type="button" className="btn" onClick={onKeepMine}>Keep my version</button>
        <button type="button" className="btn-quiet" onClick={onTakeSaved}>Take the saved version</button>
      </div>
    </section>
  );
}

/** The summary form; it starts from the user's own version while a conflict is open. */
export function OverviewForm({ values, version, semesters, callSemester, editable, mine }: OverviewPageData & { mine: OverviewValues | null }) {
  const actionData = useActionData<OverviewAnswer>();
  const navigation = useNavigation();
  const submit = useSubmit();
  const fromAction = actionData && !actionData.ok && !actionData.conflict ? actionData.values : null;
  const start: OverviewValues = mine ?? values;
  const { register, handleSubmit, formState, watch } = useForm<z.input<typeof overviewSchema>, unknown, z.output<typeof overviewSchema>>({
    resolver: zodResolver(overviewSchema),
    defaultValues: {
      version: String(version),
      title: valueText(fromAction, "title") ?? start.title,
      abstract: valueText(fromAction, "abstract") ?? start.abstract,
      scienceCategory: scienceCategoryValues.find((c) => c === (fromAction ? valueText(fromAction, "scienceCategory") : start.scienceCategory)) ?? "",
      isMultiSemester: fromAction ? valueText(fromAction, "isMultiSemester") === "on" : start.isMultiSemester,
      semestersRequested: fromAction ? valueList(fromAction, "semestersRequested") : start.semestersRequested,
      isTargetOfOpportunity: fromAction ? valueText(fromAction, "isTargetOfOpportunity") === "on" : start.isTargetOfOpportunity,
    },
  });
  const errors = actionData && !actionData.ok ? actionData.errors : {};
  const error = (field: "title" | "abstract" | "scienceCategory" | "semestersRequested" | "form") =>
    (field !== "form" ? formState.errors[field]?.message : undefined) ?? errors[field];
  const multi = watch("isMultiSemester");
  const saving = navigation.state === "submitting";
  return (
    <>
      <Form method="post" noValidate className="card space-y-5" onSubmit={handleSubmit((_, e) => submit(e?.target as HTMLFormElement))}>
        <input type="hidden" name="intent" value="save" />
        <input type="hidden" {...register("version")} />
        {error("form") ? <p role="alert" className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800">{error("form")}</p> : null}
        <fieldset disabled={!editable} className="space-y-5">
          <Field label="Title" id="title" error={error("title")}>
            <input {...inputProps("title", error("title"))} {...register("title")} />
          </Field>
          <AbstractField value={watch("abstract") ?? ""} error={error("abstract")} registration={register("abstract")} />
          <Field label="Science category" id="scienceCategory" error={error("scienceCategory")} hint="Used to find reviewers who know the field.">
            <select {...(inputProps("scienceCategory", error("scienceCategory")) as object)} className="input" {...register("scienceCategory")}>
              <option value="">Choose…</option>
              {scienceCategories.map((c) => (
                <option key={c.value} value={c.value}>{c.label}</option>
              ))}
            </select>
          </Field>
          <div className="space-y-2">
            <label className="flex items-center gap-2 font-normal">
              <input type="checkbox" {...register("isMultiSemester")} />
              <span><strong>Multi-semester programme</strong> — asks for time in several semesters (for example, astrometric epochs over years)</span>
            </label>
            {multi ? (
              <fieldset className="ml-6" aria-describedby={error("semestersRequested") ? "semesters-error" : undefined}>
                <legend className="text-sm font-semibold text-slate-700">Semesters requested</legend>
                <div className="mt-1 flex flex-wrap gap-4">
                  {semesters.map((s) => (
                    <label key={s} className="flex items-center gap-1.5 font-normal">
                      <input type="checkbox" value={s} {...register("semestersRequested")} />
                      {s}
                      {s === callSemester ? <span className="text-xs text-slate-500">(this call)</span> : null}
                    </label>
                  ))}
                </div>
                {error("semestersRequested") ? <p id="semesters-error" className="field-error" role="alert">{error("semestersRequested")}</p> : null}
              </fieldset>
            ) : null}
            <label className="flex items-center gap-2 font-normal">
              <input type="checkbox" {...register("isTargetOfOpportunity")} />
              <span><strong>Target of opportunity</strong> — observations are triggered by an event, not scheduled in advance</span>
            </label>
          </div>
        </fieldset>
        {editable ? (
          <div className="flex items-center gap-3">
            <button type="submit" className="btn" disabled={saving}>{saving ? "Saving…" : "Save the summary"}</button>
            {actionData?.ok ? <span role="status" className="text-sm text-emerald-700">Saved at {utc(actionData.savedAt)}.</span> : null}
          </div>
        ) : null}
      </Form>
    </>
  );
}
