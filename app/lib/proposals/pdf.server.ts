// The proposal PDF: a cover, technical pages (the feasibility sheet's tables, with the numbers
// behind its charts) and the uploaded science case, with a header and page numbers throughout.
// Set in Source Sans 3 from the @fontsource package that ships with the app (WOFF, unpacked to
// TrueType once per process, embedded and subset by pdf-lib with @pdf-lib/fontkit). Speed: every
// string is laid out (OpenType shaping) once per embedded font, not for every width check and draw.
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { scienceCategoryLabel } from "~/lib/proposals/vocabulary";
import { latestScienceCaseBytes } from "~/lib/proposals/science-case.server";
import { Call, Proposal, ProposalMember, User } from "~/models/index.server";
import { proposalStatusLabels } from "~/lib/domain";
import { PDFDocument } from "pdf-lib";
import { fixed as f } from "~/lib/format";
import { semesterTotals, technicalPages } from "./pdf-technical.server";
import { A4, AMBER, GREY, INK, MARGIN, RED, newWriter } from "./pdf-writer.server";

export { A4, GREY, INK, MARGIN, RULE, Writer, newWriter } from "./pdf-writer.server";

/** `anonymous`: for the committee of a dual-anonymous call, without the team (names, institutions, e-mails). */
export async function buildProposalPdf({ proposalId, anonymous = false }: { proposalId: number; anonymous?: boolean }): Promise<Uint8Array> {
  const proposal = await Proposal.findByPk(proposalId, {
    include: [
      { model: Call, as: "call" },
      { model: ProposalMember, as: "members", include: [{ model: User, as: "user" }] },
    ],
  });
  if (!proposal || !proposal.call) throw new Error(`No proposal ${proposalId}`);
  const call = proposal.call;
  const [sheet, scienceCase] = await Promise.all([computeFeasibilitySheet({ proposalId }), latestScienceCaseBytes({ proposalId })]);

  const doc = await PDFDocument.create();
  const w = await newWriter(doc);
  const codeLabel = proposal.code ?? "draft";
  doc.setTitle(`${proposal.code ?? "Draft"}: ${proposal.title}`);
  doc.setSubject(`Nightshare proposal for call ${call.semesterCode}`);
  doc.setProducer("Nightshare");
  doc.setCreator("Nightshare");
  doc.setKeywords([codeLabel, call.semesterCode]);

  // Cover
  w.newPage();
  w.y = A4[1] - MARGIN - 40;
  w.text("Nightshare · proposal for telescope time", MARGIN, w.y, 10, { color: GREY });
  w.y -= 34;
  w.text(proposal.code ?? "Draft — not submitted", MARGIN, w.y, 22, { bold: true, color: proposal.code ? INK : AMBER });
  w.y -= 30;
  for (const line of w.wrap(proposal.title, 17, A4[0] - 2 * MARGIN, true)) {
    w.text(line, MARGIN, w.y, 17, { bold: true });
    w.y -= 22;
  }
  w.y -= 4;
  w.paragraph(
    `${call.title} (semester ${call.semesterCode}, ${call.semesterStart} to ${call.semesterEnd}) · state: ${proposalStatusLabels[proposal.status as keyof typeof proposalStatusLabels]}` +
      (proposal.submittedAt ? ` · submitted ${proposal.submittedAt.toISOString().slice(0, 16).replace("T", " ")} UTC` : ""),
    10,
    { color: GREY },
  );
  const members = [...(proposal.members ?? [])].sort((a, b) => (a.role === b.role ? a.id - b.id : a.role === "pi" ? -1 : 1));
  const who = (m: ProposalMember) => `${m.user?.name ?? m.email}${m.user?.institution ? `, ${m.user.institution}` : ""}${!m.user ? " (invited)" : ""}`;
  w.heading("Team", 11);
  if (anonymous) w.paragraph("Dual-anonymous review: the team is not shown to the committee.", 10, { gap: 0, color: GREY });
  else for (const m of members) w.paragraph(`${m.role === "pi" ? "PI" : "Co-I"}: ${who(m)}`, 10, { gap: 0 });
  w.y -= 4;
  w.heading("Abstract", 11);
  w.paragraph(proposal.abstract || "(no abstract yet)", 10);
  const facts = [
    `Science category: ${scienceCategoryLabel(proposal.scienceCategory) ?? "not chosen"}`,
    proposal.isMultiSemester ? `Multi-semester programme: ${(proposal.semestersRequested ?? []).join(", ")}` : "Single semester",
    proposal.isTargetOfOpportunity ? "Target of opportunity: yes" : null,
    `${sheet.targets.length} target${sheet.targets.length === 1 ? "" : "s"}, ${sheet.observations.length} observation${sheet.observations.length === 1 ? "" : "s"}`,
  ].filter(Boolean) as string[];
  w.paragraph(facts.join(" · "), 9.5, { color: GREY });
  w.heading("Requested time", 11, w.tableLead(sheet.totals.length + 1, 9.5));
  w.table(
    [
      { label: "Semester", width: 0.15 },
      { label: "Telescope", width: 0.35 },
      { label: "Moon category", width: 0.25 },
      { label: "Hours", width: 0.25, right: true },
    ],
    [...sheet.totals.map((t) => [t.semesterCode, t.telescopeName, t.moonCategory, f(t.hours, 2)]), ...semesterTotals(sheet).map(([semester, label, hours]) => [semester, label, "", hours])],
    9.5,
  );
  const blocking = sheet.problems.filter((p) => p.severity === "blocking").length;
  w.paragraph(
    blocking ? `The feasibility sheet lists ${blocking} blocking problem${blocking === 1 ? "" : "s"} (see the technical pages).` : "The feasibility sheet lists no blocking problem.",
    9.5,
    { color: blocking ? RED : GREY },
  );

  technicalPages(w, sheet);
  const technicalCount = w.pages.length;

  if (scienceCase) {
    const source = await PDFDocument.load(scienceCase, { updateMetadata: false }); // pages only: the source's metadata stays behind
    const copied = await doc.copyPages(source, source.getPageIndices());
    for (const p of copied) w.pages.push(doc.addPage(p));
  } else {
    w.newPage();
    w.heading("Science case");
    w.paragraph("No science case has been uploaded yet.", 11, { color: AMBER });
  }

  // Header and page numbers on every page (science-case pages get them in the margins).
  const total = w.pages.length;
  const generated = new Date().toISOString().slice(0, 16).replace("T", " ");
  w.pages.forEach((page, i) => {
    const { width, height } = page.getSize();
    const head = `${codeLabel} · ${proposal.title}`;
    let h = head;
    while (h.length > 10 && w.width(h, 8) > width - 2 * 40 - 120) h = `${h.slice(0, -2)}…`;
    w.text(h, 40, height - 24, 8, { color: GREY, page });
    const right = i < technicalCount ? (i === 0 ? "cover" : "technical case") : "science case";
    w.text(right, width - 40 - w.width(right, 8), height - 24, 8, { color: GREY, page });
    const foot = `page ${i + 1} of ${total}`;
    w.text(foot, width - 40 - w.width(foot, 8), 18, 8, { color: GREY, page });
    w.text(`Nightshare · call ${call.semesterCode} · generated ${generated} UTC`, 40, 18, 8, { color: GREY, page });
  });

  return doc.save();
}
