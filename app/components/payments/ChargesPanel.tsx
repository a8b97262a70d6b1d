import { zodResolver } from "@hookform/resolvers/zod";
import { useEffect, useState } from "react";
import { useForm } from "react-hook-form";
import { Form, useLocation, useNavigation, useRevalidator, useSubmit } from "react-router";
import { Field, inputProps } from "~/components/Field";
import { formatUtc as utc } from "~/lib/format";
import { chargeKindLabels, chargeStateLabels, formatMoney } from "~/lib/payments/money";
import { declarePagesSchema } from "~/lib/schemas/charges";
import type { CheckoutReturn, TeamChargeView, PageChargeOffer } from "~/lib/payments/team.server";
import { valueText, type ActionFailure } from "~/lib/forms";
import type { z } from "zod";

/** What the Charges tab's action answers (a Pay press that works is a redirect to the payment page). */
type Answer = ActionFailure | { ok: true; intent: "declare-pages"; message: string } | null;
type Data = { isPi: boolean; charges: TeamChargeView[]; pageCharge: PageChargeOffer; proposalId: number; returned: CheckoutReturn | null };

/** The return page asks again every POLL_MS until the webhook has told us; after POLL_LIMIT_MS it says so. */
const POLL_MS = 1000;
const POLL_LIMIT_MS = 120_000;

const stateStyle: Record<TeamChargeView["state"], string> = {
  raised: "border-amber-300 bg-amber-50 text-amber-900",
  awaiting_payment: "border-sky-300 bg-sky-50 text-sky-900",
  paid: "border-emerald-300 bg-emerald-50 text-emerald-800",
  waived: "border-slate-300 bg-slate-50 text-slate-700",
};

function describe(c: TeamChargeView) {
  return c.kind === "access_fee"
    ? `${c.hours} h allocated in ${c.semesterCode} × ${formatMoney(c.rateCents, c.currency)} per hour`
    : `${c.pages} pages of the data-release paper × ${formatMoney(c.rateCents, c.currency)} per page`;
}

function ReturnNotice({ returned, charges }: { returned: CheckoutReturn; charges: TeamChargeView[] }) {
  const revalidator = useRevalidator();
  const [since] = useState(() => Date.now());
  const [gaveUp, setGaveUp] = useState(false);
  const waiting = returned.kind === "waiting";
  useEffect(() => {
    if (!waiting) return;
    const timer = setInterval(() => {
      if (Date.now() - since > POLL_LIMIT_MS) {
        setGaveUp(true);
        clearInterval(timer);
      } else if (revalidator.state === "idle") void revalidator.revalidate();
    }, POLL_MS);
    return () => clearInterval(timer);
  }, [waiting, since, revalidator]);
  const charge = "chargeId" in returned ? charges.find((c) => c.id === returned.chargeId) : undefined;
  const amount = charge ? formatMoney(charge.amountCents, charge.currency) : "";
  switch (returned.kind) {
    case "paid":
      return (
        <p role="status" className="rounded-md border border-emerald-300 bg-emerald-50 px-4 py-3 text-sm text-emerald-900">
          <strong>Paid.</strong> {amount} was received; the receipt is on its way by e-mail and can be downloaded below.
        </p>
      );
    case "waiting":
      return (
        <p role="status" aria-live="polite" className="rounded-md border border-sky-300 bg-sky-50 px-4 py-3 text-sm text-sky-900">
          {gaveUp ? (
            <>The payment service has not confirmed the payment of {amount} yet. If you paid, nothing more is needed: this page shows it as paid once the confirmation arrives (reload it later).</>
          ) : (
            <>Waiting for the payment service to confirm the payment of {amount}… This page updates by itself.</>
          )}
        </p>
      );
    case "lapsed":
      return (
        <p role="alert" className="rounded-md border border-amber-300 bg-amber-50 px-4 py-3 text-sm text-amber-900">
          The payment page expired before a payment was made. The charge is <strong>unpaid</strong>; press Pay to open a new payment page.
        </p>
      );
    case "left":
      return (
        <p role="alert" className="rounded-md border border-amber-300 bg-amber-50 px-4 py-3 text-sm text-amber-900">
          You left the payment page without paying. The charge is <strong>unpaid</strong>; nothing was taken from your card. Press Pay when you are ready.
        </p>
      );
    default:
      return (
        <p role="alert" className="rounded-md border border-amber-300 bg-amber-50 px-4 py-3 text-sm text-amber-900">
          This payment page is not one of this proposal's. The charges below show what is paid and what is due.
        </p>
      );
  }
}

function PayButton({ charge, error }: { charge: TeamChargeView; error?: string }) {
  const busy = useNavigation().formData?.get("chargeId") === String(charge.id);
  // posted to the plain address, so that a refusal does not show the last return notice again
  const { pathname } = useLocation();
  return (
    <Form method="post" action={pathname} className="flex flex-col items-end gap-1">
      <input type="hidden" name="intent" value="pay" />
      <input type="hidden" name="chargeId" value={charge.id} />
      <button type="submit" className="btn" disabled={busy}>{busy ? "Opening the payment page…" : charge.checkoutOpen ? "Continue to payment" : "Pay"}</button>
      {error ? <span role="alert" className="max-w-72 text-right text-sm text-red-700">{error}</span> : null}
    </Form>
  );
}

function PagesForm({ offer, answer }: { offer: Extract<PageChargeOffer, { open: true }>; answer: Answer }) {
  const submit = useSubmit();
  const busy = useNavigation().formData?.get("intent") === "declare-pages";
  const mine = answer?.intent === "declare-pages" ? answer : null;
  const typed = mine && !mine.ok ? (valueText(mine.values, "pages") ?? "") : "";
  const { register, handleSubmit, formState, watch } = useForm<z.input<typeof declarePagesSchema>, unknown, z.output<typeof declarePagesSchema>>({ resolver: zodResolver(declarePagesSchema), defaultValues: { intent: "declare-pages", pages: typed } });
  const error = formState.errors.pages?.message ?? (mine && !mine.ok ? (mine.errors.pages ?? mine.errors.form) : undefined);
  const pages = Number(watch("pages"));
  const { pathname } = useLocation();
  const preview = Number.isInteger(pages) && pages > 0 ? formatMoney(pages * offer.ratePerPageCents, offer.currency) : null;
  return (
    <Form method="post" action={pathname} noValidate className="card space-y-3" onSubmit={handleSubmit((_, e) => submit(e?.target as HTMLFormElement))}>
      <h2>Data-release paper</h2>
      <p className="text-sm text-slate-600">
        The semester is over. Declare the number of pages of the programme&apos;s data-release paper in the observatory&apos;s publication; a page charge of {formatMoney(offer.ratePerPageCents, offer.currency)} per page is raised. It is declared once.
      </p>
      <input type="hidden" value="declare-pages" {...register("intent")} />
      <div className="flex flex-wrap items-start gap-3">
        <div className="w-48">
          <Field label="Pages" id="pages" error={error} hint={preview ? `Page charge: ${preview}` : undefined}>
            <input inputMode="numeric" autoComplete="off" {...inputProps("pages", error)} {...register("pages")} />
          </Field>
        </div>
        <button type="submit" className="btn mt-7" disabled={busy}>{busy ? "Declaring…" : "Declare the pages"}</button>
      </div>
    </Form>
  );
}

export function ChargesPanel({ data, answer }: { data: Data; answer: Answer }) {
  const { charges, isPi, pageCharge, returned } = data;
  const payError = (id: number) => (answer && !answer.ok && answer.intent === "pay" && valueText(answer.values, "chargeId") === String(id) ? (answer.errors.chargeId ?? answer.errors.form) : undefined);
  const declared = answer?.intent === "declare-pages" && answer.ok ? answer.message : null;
  return (
    <div className="space-y-5">
      {returned ? <ReturnNotice returned={returned} charges={charges} /> : null}
      {declared ? <p role="status" className="text-sm text-emerald-700">{declared}</p> : null}
      {answer && !answer.ok && answer.intent !== "pay" && answer.intent !== "declare-pages" ? <p role="alert" className="text-sm text-red-700">{answer.errors.form}</p> : null}
      <section className="card space-y-3" aria-labelledby="charges-heading">
        <h2 id="charges-heading">Charges</h2>
        {charges.length === 0 ? (
          <p className="text-sm text-slate-600">No charges. An access fee is raised when an accepted programme&apos;s PI is at an institution outside the consortium; a page charge once the data-release paper is declared.</p>
        ) : (
          <ul className="divide-y divide-slate-200">
            {charges.map((c) => (
              <li key={c.id} className="flex flex-wrap items-start justify-between gap-4 py-3" data-charge={c.id}>
                <div className="min-w-0 space-y-1">
                  <p className="font-semibold text-night-900">
                    {chargeKindLabels[c.kind].replace(/^./, (ch) => ch.toUpperCase())} · <span className="tabular-nums">{formatMoney(c.amountCents, c.currency)}</span>{" "}
                    <span data-state={c.state} className={`ml-1 rounded-full border px-2 py-0.5 text-xs font-semibold ${stateStyle[c.state]}`}>{chargeStateLabels[c.state]}</span>
                  </p>
                  <p className="text-sm text-slate-600">{describe(c)}</p>
                  {c.state === "paid" && c.paidAt ? <p className="text-sm text-emerald-800">Paid {utc(c.paidAt)}.</p> : null}
                  {c.state === "waived" ? <p className="text-sm text-slate-700">Waived by the observatory{c.waivedAt ? ` on ${utc(c.waivedAt)}` : ""}: {c.waiveReason}</p> : null}
                  {c.checkoutOpen && c.checkoutExpiresAt ? <p className="text-sm text-sky-900">A payment page is open until {utc(c.checkoutExpiresAt)}; it has not been paid.</p> : null}
                  {c.checkoutLapsed ? <p className="text-sm text-amber-900">The last payment page expired without a payment; the charge is unpaid.</p> : null}
                </div>
                <div className="flex items-center gap-3">
                  {c.receiptUrl ? <a href={c.receiptUrl} download className="text-sm font-semibold">Receipt (PDF)</a> : null}
                  {isPi && (c.state === "raised" || c.state === "awaiting_payment") ? <PayButton charge={c} error={payError(c.id)} /> : null}
                  {!isPi && (c.state === "raised" || c.state === "awaiting_payment") ? <span className="text-xs text-slate-600">The PI pays.</span> : null}
                </div>
              </li>
            ))}
          </ul>
        )}
      </section>
      {pageCharge.open && isPi ? <PagesForm offer={pageCharge} answer={answer} /> : null}
      {pageCharge.open && !isPi ? <p className="text-sm text-slate-600">The PI declares the pages of the data-release paper.</p> : null}
      {!pageCharge.open ? <p className="text-sm text-slate-600">{pageCharge.reason}</p> : null}
    </div>
  );
}

export type { Answer as ChargesAnswer };
