// The submission receipt. Queued in the submission's transaction with the text that goes out
// without the PDF (a download link); the mail worker builds the proposal PDF when it sends and
// attaches it. If the PDF cannot be built, the receipt still goes out with the link, and the
// failure is in the proposal's history.
import { writeAudit } from "~/lib/audit.server";
import { env } from "~/lib/env.server";
import { plainMail } from "~/lib/mail/templates.server";
import { buildProposalPdf } from "~/lib/proposals/pdf.server";
import type { RenderedMail } from "../mail/renderers.server";
import { codeForFileName } from "~/lib/proposals/vocabulary";

export type ReceiptPayload = {
  proposalId: number;
  code: string;
  title: string;
  semesterCode: string;
  deadlineAt: string;
  submittedAt: string | null;
};

const when = (iso: string | null) => (iso ?? new Date().toISOString()).slice(0, 16).replace("T", " ");

export function receiptMail(p: ReceiptPayload, withPdf: boolean) {
  const link = new URL(`/proposals/${p.proposalId}/pdf`, env.APP_URL).toString();
  return plainMail({
    subject: `Nightshare receipt: ${p.code} submitted`,
    paragraphs: [
      `The proposal ${p.code}, "${p.title}", was submitted to call ${p.semesterCode} on ${when(p.submittedAt)} UTC.`,
      withPdf
        ? "The attached PDF is the proposal as the time-allocation committee will read it: the cover, the technical pages with the feasibility sheet, and the science case."
        : `The PDF could not be attached this time; download it from Nightshare: ${link}`,
      `The PI can withdraw it until the deadline, ${when(p.deadlineAt)} UTC, and reopen it as a draft to change it; it keeps its code.`,
    ],
    button: { label: "Download the proposal PDF", href: link },
  });
}

type Built = { pdf: Uint8Array | null; error: string | null };

/** Renders a queued receipt; `memo` lets one drain of the queue build each proposal's PDF once. */
export async function renderProposalReceipt(payload: Record<string, unknown>, memo: Map<string, unknown>): Promise<RenderedMail> {
  const p = payload as ReceiptPayload;
  const key = `proposal-pdf:${p.proposalId}`;
  let built = memo.get(key) as Promise<Built> | undefined;
  if (!built) {
    built = buildProposalPdf({ proposalId: p.proposalId }).then(
      (pdf) => ({ pdf, error: null }),
      async (error: unknown) => {
        const message = error instanceof Error ? error.message : String(error);
        console.error("[mail] proposal PDF for the receipt failed", error);
        await writeAudit({ actorId: null, action: "proposal.receipt_without_pdf", entityType: "proposal", entityId: p.proposalId, proposalId: p.proposalId, details: { pdfError: message } }).catch(() => undefined);
        return { pdf: null, error: message };
      },
    );
    memo.set(key, built);
  }
  const { pdf } = await built;
  const mail = receiptMail(p, Boolean(pdf));
  return {
    subject: mail.subject,
    text: mail.text,
    html: mail.html,
    attachments: pdf ? [{ filename: `${codeForFileName(p.code)}.pdf`, contentType: "application/pdf", content: Buffer.from(pdf).toString("base64") }] : [],
  };
}
