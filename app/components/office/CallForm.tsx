import { useState } from "react";
import { Form, useNavigation } from "react-router";
import { moonCategories, teamVisibilities, teamVisibilityLabels } from "~/lib/domain";
import { callSchema, currencies, offerField, type CallFormValues } from "~/lib/schemas/office";
import { formatUtc } from "~/lib/format";
import { formatInZone, zonedLocalToUtc } from "~/lib/zoned-time";
import { CallReviewOptions } from "./CallReviewOptions";
import { fieldId, FormError, Message, NumberField, OfficeFields, TextField, useField, useOfficeForm, type FormResult } from "./fields";
import { valueTexts } from "~/lib/forms";


const moonLabels = { dark: "Dark", grey: "Grey", bright: "Bright" } as const;

/** A wall-clock date and time at the observatory, with the UTC instant it means right below. */
function ZonedDateTime({
  prefix,
  name,
  label,
  timeZone,
  defaultValue,
  error,
}: {
  prefix: string;
  name: string;
  label: string;
  timeZone: string;
  defaultValue?: string;
  error?: string;
}) {
  const [value, setValue] = useState(defaultValue ?? "");
  const id = fieldId(prefix, name);
  const field = useField(name, (e) => setValue(e.target.value));
  const instant = value ? zonedLocalToUtc(value, timeZone) : null;
  return (
    <div>
      <label htmlFor={id}>
        {label} <span className="font-normal text-slate-500">{`(${timeZone})`}</span>
      </label>
      <input
        id={id}
        {...field}
        type="text"
        pattern="\d{4}-\d{2}-\d{2}[T ]\d{2}:\d{2}"
        placeholder="YYYY-MM-DD HH:MM"
        title="Date and time as YYYY-MM-DD HH:MM (24-hour clock)"
        autoComplete="off"
        maxLength={16}
        className="input"
        defaultValue={defaultValue}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : `${id}-utc`}
      />
      {error ? (
        <Message id={id} error={error} />
      ) : (
        <p id={`${id}-utc`} className="mt-1 text-xs text-slate-600" aria-live="polite">
          {instant ? (
            <>
              {formatInZone(instant, timeZone)} = <strong className="font-semibold">{formatUtc(instant)}</strong>
            </>
          ) : (
            "Observatory local time; the UTC equivalent appears here."
          )}
        </p>
      )}
    </div>
  );
}

export function CallForm({
  intent,
  initial,
  result,
  timeZone,
  telescopes,
  submitLabel,
  committed = {},
}: {
  intent: string;
  initial: CallFormValues;
  result?: FormResult;
  timeZone: string;
  telescopes: { id: number; name: string; siteName: string }[];
  submitLabel: string;
  /** hours of this semester already committed by earlier calls' locked allocations ("telescopeId|moon" → h) */
  committed?: Record<string, number>;
}) {
  const { errors, onSubmit, register } = useOfficeForm(callSchema, result?.errors);
  const navigation = useNavigation();
  const busy = navigation.state === "submitting";
  const typed = valueTexts(result?.values);
  const v = (name: keyof CallFormValues) => (typed[name] ?? initial[name]) as string | number | undefined;
  const cell = (telescopeId: number, moon: string) => typed[offerField(telescopeId, moon)] ?? initial.offers[telescopeId]?.[moon] ?? 0;
  const p = `call-${intent}`;
  return (
    <Form method="post" noValidate onSubmit={onSubmit} className="space-y-6" aria-label={submitLabel}>
      <OfficeFields value={register}>
      <input type="hidden" name="intent" value={intent} />
      <input type="hidden" {...register("timeZone")} value={timeZone} />
      <FormError error={errors.form ?? errors.timeZone} />
      <fieldset className="card space-y-4">
        <legend className="px-1 text-lg font-semibold text-night-900">The call</legend>
        <div className="grid gap-4 md:grid-cols-[12rem_1fr]">
          <TextField prefix={p} name="semesterCode" label="Semester" defaultValue={v("semesterCode")} error={errors.semesterCode} placeholder="2028A" hint="Year and A or B" />
          <TextField prefix={p} name="title" label="Title" defaultValue={v("title")} error={errors.title} placeholder="Call for proposals 2028A" />
        </div>
        <div className="grid gap-4 md:grid-cols-2">
          <ZonedDateTime prefix={p} name="opensAt" label="Opens" timeZone={timeZone} defaultValue={v("opensAt") as string} error={errors.opensAt} />
          <ZonedDateTime prefix={p} name="deadlineAt" label="Deadline" timeZone={timeZone} defaultValue={v("deadlineAt") as string} error={errors.deadlineAt} />
        </div>
        <div className="grid gap-4 md:grid-cols-3">
          {(["semesterStart", "semesterEnd"] as const).map((name) => {
            const id = fieldId(p, name);
            return (
              <div key={name}>
                <label htmlFor={id}>{name === "semesterStart" ? "Semester starts" : "Semester ends (inclusive)"}</label>
                <input
                  id={id}
                  {...register(name)}
                  type="text"
                  inputMode="numeric"
                  pattern="\d{4}-\d{2}-\d{2}"
                  placeholder="YYYY-MM-DD"
                  title="Date as YYYY-MM-DD"
                  autoComplete="off"
                  maxLength={10}
                  className="input"
                  defaultValue={v(name) as string}
                  aria-invalid={errors[name] ? true : undefined}
                  aria-describedby={errors[name] ? `${id}-error` : undefined}
                />
                <Message id={id} error={errors[name]} hint={name === "semesterEnd" ? "A semester lasts 3 to 13 months" : "Nights from this date"} />
              </div>
            );
          })}
          <NumberField prefix={p} name="pageLimit" label="Page limit" unit="pages" defaultValue={v("pageLimit")} error={errors.pageLimit} hint="Of the science case PDF" />
        </div>
      </fieldset>

      <fieldset className="card space-y-3">
        <legend className="px-1 text-lg font-semibold text-night-900">Hours offered</legend>
        <p className="text-sm text-slate-600">Per telescope and moon category. A telescope with 0 hours everywhere is not part of the call.</p>
        {telescopes.length === 0 ? <p className="text-amber-800">Set up a telescope first.</p> : null}
        <div className="overflow-x-auto">
          <table className="table-base max-w-3xl">
            <thead>
              <tr>
                <th>Telescope</th>
                {moonCategories.map((m) => (
                  <th key={m} className="text-right">
                    {moonLabels[m]} (h)
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {telescopes.map((t) => (
                <tr key={t.id}>
                  <th scope="row" className="bg-white font-semibold">
                    {t.name}
                    <span className="block text-xs font-normal text-slate-500">{t.siteName}</span>
                  </th>
                  {moonCategories.map((m) => {
                    const name = offerField(t.id, m);
                    const id = fieldId(p, name);
                    return (
                      <td key={m} className="text-right">
                        <label htmlFor={id} className="sr-only">
                          {moonLabels[m]} hours on {t.name}
                        </label>
                        <input
                          id={id}
                          {...register(name)}
                          inputMode="decimal"
                          autoComplete="off"
                          defaultValue={String(cell(t.id, m))}
                          className="input mt-0 ml-auto w-24 text-right tabular-nums"
                          aria-invalid={errors[name] ? true : undefined}
                          aria-describedby={errors[name] ? `${id}-error` : undefined}
                        />
                        {errors[name] ? (
                          <p id={`${id}-error`} role="alert" className="mt-1 text-xs text-red-700">
                            {errors[name]}
                          </p>
                        ) : null}
                        {committed[`${t.id}|${m}`] ? (
                          <p className="mt-1 text-xs text-amber-800" data-testid={`committed-${t.id}-${m}`}>
                            {committed[`${t.id}|${m}`].toFixed(1)} h already committed
                          </p>
                        ) : null}
                      </td>
                    );
                  })}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        {errors.offers ? (
          <p role="alert" className="field-error">
            {errors.offers}
          </p>
        ) : null}
      </fieldset>

      <fieldset className="card space-y-4">
        <legend className="px-1 text-lg font-semibold text-night-900">Charges</legend>
        <div className="grid gap-4 md:grid-cols-3">
          <div>
            <label htmlFor={fieldId(p, "currency")}>Currency</label>
            <select id={fieldId(p, "currency")} {...register("currency")} className="input" defaultValue={v("currency") as string}>
              {currencies.map((c) => (
                <option key={c} value={c}>
                  {c.toUpperCase()}
                </option>
              ))}
            </select>
            <Message id={fieldId(p, "currency")} error={errors.currency} />
          </div>
          <NumberField
            prefix={p}
            name="accessFee"
            label="Access fee"
            unit="per allocated hour"
            defaultValue={v("accessFee")}
            error={errors.accessFee}
            hint="Charged to non-member institutions"
          />
          <NumberField prefix={p} name="pageCharge" label="Page charge" unit="per page" defaultValue={v("pageCharge")} error={errors.pageCharge} hint="0 for none" />
        </div>
      </fieldset>

      <fieldset className="card space-y-2" aria-describedby={`${fieldId(p, "teamVisibility")}-hint`}>
        <legend className="px-1 text-lg font-semibold text-night-900">Reviewers see the team</legend>
        {teamVisibilities.map((option) => (
          <label key={option} className="flex items-start gap-2 font-normal">
            <input type="radio" {...register("teamVisibility")} value={option} defaultChecked={(v("teamVisibility") ?? "named") === option} className="mt-1" />
            <span>{teamVisibilityLabels[option]}</span>
          </label>
        ))}
        <p id={`${fieldId(p, "teamVisibility")}-hint`} className="text-sm text-slate-600">
          Dual-anonymous: reviewers never see names, institutions or e-mails of the team (pages, PDF, API); conflicts are still found from the real team. The PI is warned before the deadline where the science case names the team; the chair sees the teams only after every grade is in, by an audited reveal.
        </p>
        <Message id={fieldId(p, "teamVisibility")} error={errors.teamVisibility} />
      </fieldset>

      <CallReviewOptions prefix={p} initial={initial} typed={result ? typed : undefined} errors={errors} />

      <button type="submit" className="btn" disabled={busy}>
        {busy ? "Saving…" : submitLabel}
      </button>
      </OfficeFields>
    </Form>
  );
}
