// The decision letter as a PDF on the observatory's letterhead: a summary box (outcome, tier,
// hours, charges due) and the letter as sent, which carries the anonymised comments. Built from
// the stored letter, so the PDF, the e-mail and the PI's page say the same.
import { PDFDocument, rgb } from "pdf-lib";
import { A4, GREY, MARGIN, RULE, newWriter } from "~/lib/proposals/pdf.server";
import { formatMoney } from "~/lib/payments/money";
import { chargesText } from "./template";
import { outcomeLabels, type LetterFacts } from "./vocabulary";

const NAVY = rgb(0.118, 0.227, 0.373);

export async function buildLetterPdf(letter: { subject: string; body: string; facts: LetterFacts; sentAt: Date }): Promise<Uint8Array> {
  const f = letter.facts;
  const doc = await PDFDocument.create();
  const w = await newWriter(doc);
  doc.setTitle(letter.subject);
  doc.setSubject(`Decision on ${f.code}`);
  doc.setProducer("Nightshare");
  doc.setCreator("Nightshare");

  w.newPage();
  // letterhead
  const [width, height] = A4;
  w.page.drawRectangle({ x: 0, y: height - 74, width, height: 74, color: NAVY });
  w.text("Kestrel Ridge Observatory", MARGIN, height - 40, 18, { bold: true, color: rgb(1, 1, 1) });
  w.text("Time-allocation office · decisions sent through Nightshare", MARGIN, height - 58, 9.5, { color: rgb(0.85, 0.89, 0.95) });
  w.y = height - 74 - 34;
  const dateLine = `${letter.sentAt.toISOString().slice(0, 10)}`;
  w.text(f.piName, MARGIN, w.y, 10.5);
  w.text(dateLine, width - MARGIN - w.width(dateLine, 10.5), w.y, 10.5, { color: GREY });
  w.y -= 15;
  w.text(`${f.code} · call ${f.semesterCode}`, MARGIN, w.y, 10.5, { color: GREY });
  w.y -= 26;
  for (const line of w.wrap(letter.subject, 13.5, width - 2 * MARGIN, true)) {
    w.text(line, MARGIN, w.y, 13.5, { bold: true });
    w.y -= 18;
  }
  w.y -= 4;

  // summary box
  const thisSemester = f.hours.filter((h) => h.semesterCode === f.semesterCode).reduce((s, h) => s + h.hours, 0);
  const lines: [string, string][] = [
    ["Outcome", outcomeLabels[f.outcome]],
    ["Tier", f.tier ?? "none"],
    ["Hours", f.hours.length ? `${thisSemester.toFixed(1)} h in ${f.semesterCode}${f.hours.some((h) => h.semesterCode !== f.semesterCode) ? " (and later semesters, below)" : ""}` : "none"],
    ["Charges due", f.charge ? formatMoney(f.charge.amountCents, f.charge.currency) : "nothing"],
  ];
  const boxTop = w.y + 4;
  w.y -= 12;
  for (const [k, v] of lines) {
    w.text(k, MARGIN + 10, w.y, 10, { bold: true });
    w.text(v, MARGIN + 110, w.y, 10);
    w.y -= 14;
  }
  w.page.drawRectangle({ x: MARGIN, y: w.y + 4, width: width - 2 * MARGIN, height: boxTop - w.y - 4, borderColor: RULE, borderWidth: 0.8 });
  w.y -= 12;
  if (f.hours.length) {
    w.table(
      [
        { label: "Telescope", width: 0.4 },
        { label: "Moon category", width: 0.2 },
        { label: "Semester", width: 0.2 },
        { label: "Hours", width: 0.2, right: true },
      ],
      f.hours.map((h) => [h.telescope, h.moonCategory, h.semesterCode, h.hours.toFixed(1)]),
      9.5,
    );
  }
  if (f.charge) w.paragraph(chargesText(f), 9.5, { color: GREY, gap: 8 });

  // the letter
  w.y -= 6;
  for (const para of letter.body.split(/\n{2,}/)) {
    const bold = /^Reviewer \d+:/.test(para);
    if (bold) {
      const [head, ...rest] = para.split("\n");
      w.paragraph(head, 10.5, { bold: true, gap: 1 });
      if (rest.length) w.paragraph(rest.join("\n"), 10.5, { gap: 8 });
    } else w.paragraph(para, 10.5, { gap: 8 });
  }

  const total = w.pages.length;
  w.pages.forEach((page, i) => {
    const foot = `page ${i + 1} of ${total}`;
    w.text(foot, width - 40 - w.width(foot, 8), 18, 8, { color: GREY, page });
    w.text(`Kestrel Ridge Observatory · decision on ${f.code}`, 40, 18, 8, { color: GREY, page });
  });
  return doc.save();
}
