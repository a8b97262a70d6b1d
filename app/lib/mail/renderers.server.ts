// Messages the worker renders when it sends (outgoing_mail.kind + payload), so that they can be
// queued inside the transaction of the change they report, before the data they show (a PDF)
// is readable by anyone else. If a renderer fails, the stored subject and text go out instead.
import type { MailAttachment, OutgoingMail } from "~/models/OutgoingMail";

export type RenderedMail = { subject: string; text: string; html: string | null; attachments: MailAttachment[] };

export async function renderQueuedMail(mail: OutgoingMail, memo: Map<string, unknown>): Promise<RenderedMail> {
  const stored: RenderedMail = { subject: mail.subject, text: mail.textBody, html: mail.htmlBody, attachments: mail.attachments ?? [] };
  if (!mail.kind) return stored;
  try {
    switch (mail.kind) {
      case "proposal-receipt": {
        const { renderProposalReceipt } = await import("../proposals/receipt.server");
        return await renderProposalReceipt(mail.payload ?? {}, memo);
      }
      case "decision-letter": {
        const { renderDecisionLetter } = await import("../decisions/render-mail.server");
        return await renderDecisionLetter(mail.payload ?? {}, memo);
      }
      case "charge-receipt": {
        const { renderChargeReceipt } = await import("../payments/receipt.server");
        return await renderChargeReceipt(mail.payload ?? {});
      }
    }
  } catch (error) {
    console.error(`[mail] rendering ${mail.kind} for outgoing_mail ${mail.id} failed; sending the stored text:`, error);
  }
  return stored;
}
