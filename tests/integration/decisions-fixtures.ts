// A call with three decided proposals (accepted, waitlisted, declined) and reviews whose names,
// institutions and comments to the committee must never reach a letter. All names are invented.
import { lockAllocation } from "~/lib/allocation/allocate.server";
import { Allocation, BoardEntry, Proposal, ProposalMember, ReviewAssignment, Telescope, User } from "~/models/index.server";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

export const REVIEWERS = [
  { name: "Ottoline Brackwater", institution: "Fenwold Institute of Optics" },
  { name: "Caspian Threlkeld", institution: "Harrowgate Polytechnic Observatory" },
  { name: "Iolanthe Marwick", institution: "Saltmarsh Academy of Sciences" },
];

export async function decidedCall({ lock = true }: { lock?: boolean } = {}) {
  const chair = await newUser({ roles: ["chair"], name: "Decisions Chair" });
  const admin = await newUser({ roles: ["admin"], name: "Decisions Office" });
  const reviewers = [];
  for (const r of REVIEWERS) {
    const person = await newUser({ roles: ["reviewer"], name: r.name });
    await User.update({ institution: r.institution }, { where: { id: person.user.id } });
    reviewers.push(person);
  }
  const call = await testCall();
  await call.update({ accessFeePerHourCents: 12_500, currency: "EUR" });
  const telescope = (await Telescope.findOne({ order: [["id", "ASC"]] }))!;
  const outcomes = ["accepted", "waitlisted", "declined"] as const;
  const proposals: { proposal: Proposal; pi: Awaited<ReturnType<typeof newUser>>; comments: string[]; committee: string[] }[] = [];
  for (const [i, outcome] of outcomes.entries()) {
    const pi = await newUser({ name: `Decision PI ${outcome}` });
    await User.update({ isMemberInstitution: false, institution: "Visiting Institute" }, { where: { id: pi.user.id } });
    const { proposal } = await readyProposal({ user: pi.user, callId: call.id, title: `Decision test programme ${outcome} ${call.semesterCode}` });
    await Proposal.update({ status: "in_review", code: `${String(i + 1).padStart(3, "0")}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    const comments: string[] = [];
    const committee: string[] = [];
    for (const [r, reviewer] of reviewers.entries()) {
      const toPi = `Comment to PI ${outcome} number ${r + 1}: the epoch spacing is sound and the exposure budget is clear.`;
      const toCommittee = `Committee only ${outcome} ${r + 1}: I know this team well.`;
      comments.push(toPi);
      committee.push(toCommittee);
      await ReviewAssignment.create({ callId: call.id, proposalId: proposal.id, reviewerId: reviewer.user.id, status: "submitted", overall: 7, science: 7, feasibility: 7, legacy: 7, commentToPi: toPi, commentToCommittee: toCommittee, submittedAt: new Date() });
    }
    proposals.push({ proposal: (await Proposal.findByPk(proposal.id))!, pi, comments, committee });
  }
  await call.update({ deadlineAt: new Date(Date.now() - 86_400_000) });
  // a draft review's comment is not a review yet
  const draftReviewer = await newUser({ roles: ["reviewer"], name: "Draft Reviewer" });
  await ReviewAssignment.create({ callId: call.id, proposalId: proposals[0].proposal.id, reviewerId: draftReviewer.user.id, status: "draft", commentToPi: "Draft comment that was never submitted." });
  // the accepted one has a Co-I who gets the letter too
  const coi = await newUser({ name: "Decision Co-I" });
  await ProposalMember.create({ proposalId: proposals[0].proposal.id, userId: coi.user.id, email: coi.email, role: "coi", acceptedAt: new Date() });
  // 10.5 dark hours in the call's semester: access fee 10.5 × EUR 125.00 = EUR 1,312.50 (by hand)
  await Allocation.create({ callId: call.id, proposalId: proposals[0].proposal.id, telescopeId: telescope.id, moonCategory: "dark", semesterCode: call.semesterCode, hours: 10.5 });
  await BoardEntry.create({ callId: call.id, proposalId: proposals[0].proposal.id, chairRank: null, chairRankReason: null, tier: "queue" });
  await BoardEntry.create({ callId: call.id, proposalId: proposals[1].proposal.id, chairRank: null, chairRankReason: null, tier: null, waitlisted: true });
  if (lock) await lockAllocation({ actor: chair.user, callId: call.id });
  return { chair, admin, reviewers, call, telescope, proposals, coi, draftReviewer };
}

/** Text of a PDF through Debian's pdftotext (poppler-utils). */
export async function pdfText(bytes: Uint8Array) {
  const { spawnSync } = await import("node:child_process");
  const { mkdtempSync, writeFileSync } = await import("node:fs");
  const { tmpdir } = await import("node:os");
  const path = await import("node:path");
  const file = path.join(mkdtempSync(path.join(tmpdir(), "decision-")), "letter.pdf");
  writeFileSync(file, bytes);
  const run = spawnSync("pdftotext", [file, "-"], { encoding: "utf8" });
  if (run.error) throw new Error("pdftotext (Debian's poppler-utils) must be installed: run `sh app/cli/bootstrap.sh --browser`");
  if (run.status !== 0) throw new Error(`pdftotext failed: ${run.stderr}`);
  return run.stdout;
}
