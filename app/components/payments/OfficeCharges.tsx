import { zodResolver } from "@hookform/resolvers/zod";
import { createColumnHelper, getCoreRowModel, getFilteredRowModel, getSortedRowModel, useReactTable, type SortingState } from "@tanstack/react-table";
import { useEffect, useMemo, useState } from "react";
import { useForm } from "react-hook-form";
import { Form, useNavigation, useSubmit } from "react-router";
import { Field, inputProps } from "~/components/Field";
import { SortableTable } from "~/components/SortableTable";
import { formatUtc as utc } from "~/lib/format";
import { chargeKindLabels, chargeStateLabels, formatMoney } from "~/lib/payments/money";
import type { OfficeChargeView } from "~/lib/payments/office.server";
import { valueText, type ActionFailure, type FormValues } from "~/lib/forms";
import { waiveSchema } from "~/lib/schemas/charges";

/** What the office's waive action answers. */
export type WaiveAnswer = ActionFailure | { ok: true; intent: "waive"; values: FormValues; message: string; at: number };
type Answer = WaiveAnswer | null;
type StateFilter = "all" | OfficeChargeView["state"];

const column = createColumnHelper<OfficeChargeView>();

function WaiveForm({ charge, answer, onDone }: { charge: OfficeChargeView; answer: Answer; onDone: () => void }) {
  const submit = useSubmit();
  const busy = useNavigation().formData?.get("chargeId") === String(charge.id);
  const mine = answer && valueText(answer.values, "chargeId") === String(charge.id) ? answer : null;
  const typed = mine && !mine.ok ? (valueText(mine.values, "reason") ?? "") : "";
  const { register, handleSubmit, formState } = useForm({ resolver: zodResolver(waiveSchema), defaultValues: { intent: "waive" as const, chargeId: charge.id, reason: typed } });
  const error = formState.errors.reason?.message ?? (mine && !mine.ok ? (mine.errors.reason ?? mine.errors.chargeId ?? mine.errors.form) : undefined);
  useEffect(() => {
    if (mine?.ok) onDone();
  }, [mine?.ok, mine?.ok ? mine.at : 0, onDone]);
  const id = `reason-${charge.id}`;
  return (
    <Form method="post" noValidate className="mt-2 space-y-2 rounded border border-slate-300 bg-slate-50 p-2" onSubmit={handleSubmit((_, e) => submit(e?.target as HTMLFormElement))}>
      <input type="hidden" value="waive" {...register("intent")} />
      <input type="hidden" value={charge.id} {...register("chargeId")} />
      <Field label={`Reason for waiving ${formatMoney(charge.amountCents, charge.currency)}`} id={id} error={error} hint="Kept in the audit log and shown to the PI.">
        <input autoComplete="off" {...inputProps(id, error)} {...register("reason")} />
      </Field>
      <div className="flex gap-2">
        <button type="submit" className="btn" disabled={busy}>{busy ? "Waiving…" : "Waive the charge"}</button>
        <button type="button" className="btn-quiet" onClick={onDone}>Cancel</button>
      </div>
    </Form>
  );
}

function Actions({ charge, answer }: { charge: OfficeChargeView; answer: Answer }) {
  const mine = answer && valueText(answer.values, "chargeId") === String(charge.id) && !answer.ok;
  const [open, setOpen] = useState(Boolean(mine));
  if (charge.state === "paid" || charge.state === "waived") {
    return charge.state === "waived" ? <span className="text-xs text-slate-600" title={charge.waiveReason ?? undefined}>by {charge.waivedBy ?? "—"}: {charge.waiveReason}</span> : null;
  }
  return open ? <WaiveForm charge={charge} answer={answer} onDone={() => setOpen(false)} /> : <button type="button" className="btn-quiet" onClick={() => setOpen(true)}>Waive…</button>;
}

export function OfficeCharges({ charges, answer }: { charges: OfficeChargeView[]; answer: Answer }) {
  const [sorting, setSorting] = useState<SortingState>([{ id: "createdAt", desc: true }]);
  const [state, setState] = useState<StateFilter>("all");
  const rows = useMemo(() => (state === "all" ? charges : charges.filter((c) => c.state === state)), [charges, state]);
  const columns = useMemo(
    () => [
      column.accessor((c) => c.code ?? "", { id: "code", header: "Proposal", cell: (c) => <span title={c.row.original.title}>{c.getValue() || "—"}</span> }),
      column.accessor("title", { header: "Title", cell: (c) => <span className="line-clamp-2 max-w-64">{c.getValue()}</span> }),
      column.accessor((c) => c.piName ?? c.piEmail ?? "", { id: "pi", header: "PI", cell: (c) => <span>{c.getValue()}<span className="block text-xs text-slate-600">{c.row.original.piInstitution}</span></span> }),
      column.accessor((c) => chargeKindLabels[c.kind], { id: "kind", header: "Kind" }),
      column.accessor("semesterCode", { header: "Semester" }),
      column.accessor("amountCents", { header: "Amount", cell: (c) => <span className="tabular-nums">{formatMoney(c.getValue(), c.row.original.currency)}</span> }),
      column.accessor("state", { header: "State", cell: (c) => <span data-state={c.getValue()}>{chargeStateLabels[c.getValue()]}</span> }),
      column.accessor("createdAt", { header: "Raised", cell: (c) => utc(c.getValue()) }),
      column.accessor((c) => c.paidAt ?? "", { id: "paidAt", header: "Paid", cell: (c) => (c.getValue() ? utc(c.getValue()) : "—") }),
      column.display({ id: "actions", header: "Waiver", cell: (c) => <Actions charge={c.row.original} answer={answer} /> }),
    ],
    [answer],
  );
  const table = useReactTable({ data: rows, columns, state: { sorting }, onSortingChange: setSorting, getCoreRowModel: getCoreRowModel(), getSortedRowModel: getSortedRowModel(), getFilteredRowModel: getFilteredRowModel(), getRowId: (r) => String(r.id) });
  const count = (s: StateFilter) => (s === "all" ? charges.length : charges.filter((c) => c.state === s).length);
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h1>Charges</h1>
          <p className="text-slate-600">Access fees of accepted programmes from outside the consortium, and page charges of data-release papers.</p>
        </div>
        <a href="/admin/charges.csv" download className="btn-quiet">Export as CSV</a>
      </div>
      {answer?.ok ? <p role="status" className="text-sm text-emerald-700">{answer.message}</p> : null}
      {answer && !answer.ok && answer.errors.form ? <p role="alert" className="text-sm text-red-700">{answer.errors.form}</p> : null}
      <fieldset className="flex flex-wrap gap-2" aria-label="Show charges">
        {(["all", "raised", "awaiting_payment", "paid", "waived"] as const).map((s) => (
          <label key={s} className={`cursor-pointer rounded-full border px-3 py-1 text-sm ${state === s ? "border-night-700 bg-night-100 font-semibold" : "border-slate-300"}`}>
            <input type="radio" name="state-filter" value={s} checked={state === s} onChange={() => setState(s)} className="sr-only" />
            {s === "all" ? "all" : chargeStateLabels[s]} ({count(s)})
          </label>
        ))}
      </fieldset>
      <SortableTable table={table} empty="No charge in this state." />
    </div>
  );
}
