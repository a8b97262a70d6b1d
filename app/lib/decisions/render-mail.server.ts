// The queued decision letter as the worker sends it: the letter's text as the body and its PDF
// attached (built once per letter per drain). Without the PDF, the stored text (with the link) goes out.
import { plainMail } from "~/lib/mail/templates.server";
import type { RenderedMail } from "~/lib/mail/renderers.server";
import { codeForFileName } from "~/lib/proposals/vocabulary";
import { DecisionLetter } from "~/models/index.server";
import { buildLetterPdf } from "./letter-pdf.server";
import { decisionPageUrl } from "./send.server";

export function letterFileName(code: string) {
  return `decision-${codeForFileName(code)}.pdf`;
}

export async function renderDecisionLetter(payload: Record<string, unknown>, memo: Map<string, unknown>): Promise<RenderedMail> {
  const letterId = Number(payload.letterId);
  const key = `decision-letter:${letterId}`;
  let built = memo.get(key) as Promise<{ letter: DecisionLetter; pdf: Uint8Array }> | undefined;
  if (!built) {
    built = (async () => {
      const letter = await DecisionLetter.findByPk(letterId);
      if (!letter) throw new Error(`No decision letter ${letterId}`);
      return { letter, pdf: await buildLetterPdf(letter) };
    })();
    memo.set(key, built);
  }
  const { letter, pdf } = await built;
  const closing = "The letter is attached as a PDF; it is also on the proposal's decision page in Nightshare.";
  const button = { label: "Open the decision in Nightshare", href: decisionPageUrl(letter.proposalId as number) };
  // the HTML part keeps the letter's line breaks (lists of hours, "Reviewer 1:" above its comment)
  const mail = plainMail({ subject: letter.subject, paragraphs: [...letter.body.split(/\n+/), closing], button });
  const text = `${letter.body}\n\n${closing}\n\n${button.label}: ${button.href}`;
  return { subject: mail.subject, text, html: mail.html, attachments: [{ filename: letterFileName(letter.facts.code), contentType: "application/pdf", content: Buffer.from(pdf).toString("base64") }] };
}
