// The receipt of a paid charge: a one-page PDF (pdf-lib, Source Sans 3, through the proposal PDF's
// writer) and the e-mail that carries it. The mail is queued in the transaction that marks the
// charge paid, with the data the receipt shows; the worker builds the PDF when it sends.
import { PDFDocument, rgb } from "pdf-lib";
import type { Transaction } from "sequelize";
import { env } from "~/lib/env.server";
import { plainMail } from "~/lib/mail/templates.server";
import type { RenderedMail } from "~/lib/mail/renderers.server";
import { newWriter } from "~/lib/proposals/pdf.server";
import { codeForFileName } from "~/lib/proposals/vocabulary";
import { Call, Charge, Proposal, ProposalMember, User } from "~/models/index.server";
import { chargeKindLabels, formatMoney } from "./money";

export type ChargeReceiptPayload = {
  chargeId: number;
  proposalId: number;
  code: string | null;
  title: string;
  callSemester: string;
  kind: Charge["kind"];
  semesterCode: string;
  hours: number | null;
  pages: number | null;
  rateCents: number;
  amountCents: number;
  currency: string;
  paidAt: string;
  paymentReference: string | null;
  eventId: string | null;
  piName: string | null;
  piEmail: string;
  piInstitution: string | null;
};

/** Our receipt number: the charge id, six digits, and the call's short semester (`R000042/27A`). */
export function receiptNumber(p: Pick<ChargeReceiptPayload, "chargeId" | "callSemester">) {
  return `R${String(p.chargeId).padStart(6, "0")}/${p.callSemester.slice(-3)}`;
}

export async function receiptPayloadOf({ charge, proposal, transaction }: { charge: Charge; proposal: Proposal; transaction?: Transaction }): Promise<ChargeReceiptPayload> {
  const pi = await ProposalMember.findOne({ where: { proposalId: proposal.id, role: "pi" }, include: [{ model: User, as: "user" }], transaction });
  const call = proposal.call ?? (await Call.findByPk(proposal.callId as number, { transaction }));
  return {
    chargeId: charge.id,
    proposalId: proposal.id,
    code: proposal.code,
    title: proposal.title,
    callSemester: call?.semesterCode ?? charge.semesterCode,
    kind: charge.kind,
    semesterCode: charge.semesterCode,
    hours: charge.hours,
    pages: charge.pages,
    rateCents: charge.rateCents,
    amountCents: charge.amountCents,
    currency: charge.currency,
    paidAt: (charge.paidAt ?? new Date()).toISOString(),
    paymentReference: charge.checkoutSessionId,
    eventId: charge.paymentEventId,
    piName: pi?.user?.name ?? null,
    piEmail: pi?.user?.email ?? pi?.email ?? "",
    piInstitution: pi?.user?.institution ?? null,
  };
}

const when = (iso: string) => `${iso.slice(0, 16).replace("T", " ")} UTC`;

function what(p: ChargeReceiptPayload) {
  return p.kind === "access_fee"
    ? `${chargeKindLabels.access_fee}: ${p.hours} h allocated in ${p.semesterCode} × ${formatMoney(p.rateCents, p.currency)} per hour`
    : `${chargeKindLabels.page_charge}: ${p.pages} pages of the data-release paper × ${formatMoney(p.rateCents, p.currency)} per page`;
}

export function receiptDownloadPath(p: Pick<ChargeReceiptPayload, "proposalId" | "chargeId">) {
  return `/proposals/${p.proposalId}/charges/${p.chargeId}/receipt.pdf`;
}

export function receiptFileName(p: ChargeReceiptPayload) {
  return `receipt-${codeForFileName(receiptNumber(p))}.pdf`;
}

export function chargeReceiptMail(p: ChargeReceiptPayload, withPdf: boolean) {
  const link = new URL(receiptDownloadPath(p), env.APP_URL).toString();
  const code = p.code ?? `proposal ${p.proposalId}`;
  return plainMail({
    subject: `Nightshare receipt ${receiptNumber(p)}: ${formatMoney(p.amountCents, p.currency)} paid for ${code}`,
    paragraphs: [
      `Thank you: ${formatMoney(p.amountCents, p.currency)} for ${code}, "${p.title}", was received on ${when(p.paidAt)}.`,
      `${what(p)}.`,
      withPdf ? "The receipt is attached as a PDF." : `The receipt can be downloaded from Nightshare: ${link}`,
    ],
    button: { label: "Download the receipt", href: link },
  });
}

const GREY = rgb(0.4, 0.45, 0.52);

export async function buildReceiptPdf(p: ChargeReceiptPayload): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  const w = await newWriter(doc);
  const number = receiptNumber(p);
  doc.setTitle(`Receipt ${number}`);
  doc.setSubject(`Payment of a charge for ${p.code ?? `proposal ${p.proposalId}`}`);
  doc.setProducer("Nightshare");
  doc.setCreator("Nightshare");
  w.newPage();
  const left = 50;
  w.text("Nightshare · observatory time office", left, w.y, 10, { color: GREY });
  w.y -= 34;
  w.text(`Receipt ${number}`, left, w.y, 22, { bold: true });
  w.y -= 30;
  w.paragraph(`Paid ${when(p.paidAt)}`, 11);
  w.heading("Received from", 12);
  w.paragraph([p.piName, p.piInstitution, p.piEmail].filter(Boolean).join(" · "), 10);
  w.heading("For", 12);
  w.paragraph(`${p.code ?? `Proposal ${p.proposalId}`}: ${p.title}`, 10, { bold: true });
  w.paragraph(`Call ${p.callSemester}`, 10);
  w.table(
    [
      { label: "Item", width: 0.46 },
      { label: "Quantity", width: 0.16, right: true },
      { label: "Rate", width: 0.19, right: true },
      { label: "Amount", width: 0.19, right: true },
    ],
    [
      [
        p.kind === "access_fee" ? `Access fee, semester ${p.semesterCode}` : "Page charge, data-release paper",
        p.kind === "access_fee" ? `${p.hours} h` : `${p.pages} pages`,
        formatMoney(p.rateCents, p.currency),
        formatMoney(p.amountCents, p.currency),
      ],
      ["Total paid", "", "", formatMoney(p.amountCents, p.currency)],
    ],
    10,
  );
  w.heading("Payment", 12);
  w.paragraph(`Card payment through the observatory's payment service. Reference ${p.paymentReference ?? "—"}${p.eventId ? `, confirmation ${p.eventId}` : ""}.`, 9, { color: GREY });
  return doc.save();
}

/** The queued receipt as the mail worker sends it: the PDF attached (or the link when it fails). */
export async function renderChargeReceipt(payload: Record<string, unknown>): Promise<RenderedMail> {
  const p = payload as unknown as ChargeReceiptPayload;
  let pdf: Uint8Array | null = null;
  try {
    pdf = await buildReceiptPdf(p);
  } catch (error) {
    console.error("[mail] receipt PDF failed; sending the link", error);
  }
  const mail = chargeReceiptMail(p, Boolean(pdf));
  return {
    subject: mail.subject,
    text: mail.text,
    html: mail.html,
    attachments: pdf ? [{ filename: receiptFileName(p), contentType: "application/pdf", content: Buffer.from(pdf).toString("base64") }] : [],
  };
}

/** The receipt of a paid charge, for the download route (the caller checked the team). */
export async function receiptPdfOfCharge({ chargeId, proposalId }: { chargeId: number; proposalId: number }): Promise<{ filename: string; pdf: Uint8Array } | null> {
  const charge = await Charge.findOne({ where: { id: chargeId, proposalId, state: "paid" } });
  if (!charge) return null;
  const proposal = await Proposal.findByPk(proposalId, { include: [{ model: Call, as: "call" }] });
  if (!proposal) return null;
  const payload = await receiptPayloadOf({ charge, proposal });
  return { filename: receiptFileName(payload), pdf: await buildReceiptPdf(payload) };
}
