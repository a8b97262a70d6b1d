// Demo of a distributed review: a small call (ten proposals from invented PIs and institutions)
// reviewed by its submitters. Each team named its reviewer (eight PIs themselves, two a Co-I);
// the call keeps competitors apart (same telescope × moon category); the suggestion gave each
// designated reviewer four proposals; some reviewers have submitted all of theirs, some part, some
// none. Dates are relative to the seeding day: the call's deadline passed 12 days ago (before the
// panel-reviewed demo call's, so the demo review seeder's "latest deadline" stays that one), the
// review deadline is 9 days ahead. Its semester is the one after the open demo call's.
// Idempotent: a call whose review is committed is left alone; users and proposals are found first.
//
// Targets: invented fields written for an A semester (turned by 12 h in RA for a B one), each a
// few tenths of a degree from a field of the main demo; tests/integration/demo-sky.test.ts checks
// them like the others (distributedDemoTargets).
import { createHash } from "node:crypto";
import type { Sequelize } from "sequelize";
import type { MoonCategory } from "~/lib/domain";
import { pairKey } from "~/lib/review/conflicts";
import { callFacts } from "~/lib/review/facts.server";
import { suggestAssignments } from "~/lib/review/suggest";
import { proposalCode } from "~/lib/proposals/vocabulary";
import { defaultSemesterSpan, upcomingSemesters, type SemesterSpan } from "~/lib/semesters";
import { AuditEntry, Call, CallOffer, CallReview, Filter, Instrument, Observation, Proposal, ProposalMember, ReviewAssignment, ReviewPanelMember, StoredFile, Target, Telescope, User } from "~/models/index.server";
import { consortium, demoCallPlan } from "./20261201000100-demo-observatory";
import { scienceCasePdf } from "./20261201000300-demo-proposals";
import { demoReviewGrades } from "../demo-review-grades";

const DAY = 86_400_000;

type Team = { email: string; name: string; institution: string; member: boolean };
type DistributedDemo = {
  title: string;
  category: string;
  pi: Team;
  /** the Co-I who reviews for the team, when not the PI */
  reviewerCoi?: Team;
  target: { name: string; ra: number; dec: number; mag: number };
  telescope: "2.4" | "1.0";
  moon: MoonCategory;
};

// Invented people and institutions; two PIs share an institution, so the institution rule shows.
const demos: DistributedDemo[] = [
  { title: "A faint-companion census around Harrowgate Field stars", category: "stellar-physics", pi: { email: "w.ostrander@harrowgate.example", name: "Wenna Ostrander", institution: "Harrowgate Polytechnic", member: true }, target: { name: "Harrowgate Field 1", ra: 146.7, dec: 33.0, mag: 15.2 }, telescope: "2.4", moon: "dark" },
  { title: "Variable stars in the outskirts of the Ossel Cluster", category: "stellar-populations", pi: { email: "c.mbatha-linde@fernlow.example", name: "Corin Mbatha-Linde", institution: "Fernlow University", member: false }, target: { name: "Ossel outskirts east", ra: 175.0, dec: 26.3, mag: 16.0 }, telescope: "1.0", moon: "dark" },
  { title: "Colour gradients of three dwarf galaxies near Lowfen", category: "galaxies", pi: { email: "a.quillfeather@marrowby.example", name: "Anselm Quillfeather", institution: "Marrowby Observatory", member: true }, reviewerCoi: { email: "j.tarrant@marrowby.example", name: "Jessamy Tarrant", institution: "Marrowby Observatory", member: true }, target: { name: "Lowfen Dwarf 3", ra: 180.2, dec: 33.6, mag: 17.1 }, telescope: "2.4", moon: "grey" },
  { title: "Eclipse timing of a wide binary in the Stonechat group", category: "stellar-physics", pi: { email: "r.vantongeren@quarry-hill.example", name: "Rutger Vantongeren", institution: "Quarry Hill Institute", member: false }, target: { name: "Stonechat Binary 3", ra: 193.0, dec: 46.1, mag: 12.8 }, telescope: "1.0", moon: "grey" },
  { title: "Transit depths of a warm sub-Neptune in two bands", category: "exoplanets", pi: { email: "s.okwuosa@fernlow.example", name: "Saoirse Okwuosa", institution: "Fernlow University", member: false }, target: { name: "Linnet Host b", ra: 162.5, dec: 26.7, mag: 11.9 }, telescope: "2.4", moon: "bright" },
  { title: "Slow novae in the Tessaly Knot: a light-curve archive", category: "transients", pi: { email: "m.aldergrove@brindle.example", name: "Mattias Aldergrove", institution: "Brindle College", member: true }, target: { name: "Tessaly Knot west", ra: 236.0, dec: 28.3, mag: 16.4 }, telescope: "1.0", moon: "bright" },
  { title: "Proper motions of the Quillon Group's faint members", category: "clusters-astrometry", pi: { email: "h.nakashima-orr@easterlyn.example", name: "Hana Nakashima-Orr", institution: "Easterlyn Space Laboratory", member: true }, reviewerCoi: { email: "p.galloway-itu@easterlyn.example", name: "Piet Galloway-Itu", institution: "Easterlyn Space Laboratory", member: true }, target: { name: "Quillon Group south", ra: 229.2, dec: 37.8, mag: 16.9 }, telescope: "2.4", moon: "dark" },
  { title: "Rotation periods of cool dwarfs in the Rookery fields", category: "stellar-physics", pi: { email: "e.stroud-amari@cowlick.example", name: "Elowen Stroud-Amari", institution: "Cowlick School of Astronomy", member: false }, target: { name: "Rookery dwarf field", ra: 139.9, dec: 9.6, mag: 15.6 }, telescope: "1.0", moon: "dark" },
  { title: "The stellar halo of Brannock Field 2 in deep V images", category: "stellar-populations", pi: { email: "t.fairweather@lantern-moor.example", name: "Tobin Fairweather", institution: "Lantern Moor University", member: true }, target: { name: "Brannock halo north", ra: 201.6, dec: 18.9, mag: 17.4 }, telescope: "2.4", moon: "grey" },
  { title: "A search for flares on young stars near Kestrel Field 7", category: "transients", pi: { email: "l.okonjo-bright@saltings.example", name: "Lark Okonjo-Bright", institution: "Saltings Observatory", member: false }, target: { name: "Kestrel Field 7 flare stars", ra: 145.8, dec: 33.8, mag: 14.7 }, telescope: "1.0", moon: "grey" },
];

export const distributedDemoTargets = demos.map((d) => ({ name: d.target.name, ra: d.target.ra, dec: d.target.dec }));
export const DISTRIBUTED_DEMO_TITLE = "Submitter-reviewed call";

const comments = [
  "The science question is clear and the single field is well chosen for it.",
  "The programme is compact and its goal is stated in one measurable number, which makes it easy to judge.",
  "The case is interesting, although the team could explain better why this field and not a neighbouring one.",
];
const technical = [
  "The feasibility sheet shows the requested moon category leaves enough usable hours, and the exposure reaches the signal-to-noise the analysis needs. The overheads look right for six frames per visit.",
  "The exposure plan is sensible, but the airmass limit leaves little margin at the end of the semester; the team should say what it does if the first nights are lost to weather.",
];
const endings = [
  "A short plan for releasing the reduced images would add value for other teams. I would support the request.",
  "I would like to see earlier results of the team on similar data; as it stands the proposal is competitive but not outstanding.",
];

async function userFor(t: Team, transaction: import("sequelize").Transaction) {
  const [u] = await User.findOrCreate({ where: { email: t.email }, defaults: { email: t.email, name: t.name, institution: t.institution, isMemberInstitution: t.member, lastSignInAt: null }, transaction });
  return u;
}

export async function up({ context: sequelize }: { context: Sequelize }) {
  const now = new Date();
  const plan = demoCallPlan(now);
  const semesterCode = upcomingSemesters(plan.open.semesterCode, 2)[1];
  const existing = await Call.findOne({ where: { semesterCode } });
  if (existing && (await CallReview.findOne({ where: { callId: existing.id } }))?.committedAt) return;
  const span = defaultSemesterSpan(semesterCode) as SemesterSpan;
  const dates = { semesterStart: span.start, semesterEnd: span.end };
  const turn = semesterCode.endsWith("A") ? 0 : 180;

  await sequelize.transaction(async (transaction) => {
    const deadline = new Date(now.getTime() - 12 * DAY);
    deadline.setUTCHours(23, 59, 0, 0);
    const [call] = await Call.findOrCreate({
      where: { semesterCode },
      defaults: {
        semesterCode,
        title: `${DISTRIBUTED_DEMO_TITLE} ${semesterCode}`,
        opensAt: new Date(now.getTime() - 70 * DAY),
        deadlineAt: deadline,
        ...dates,
        pageLimit: 4,
        currency: consortium.currency,
        accessFeePerHourCents: consortium.accessFeePerHourCents,
        pageChargeCents: consortium.pageChargeCents,
        reviewMode: "distributed",
        reviewsPerSubmitter: 4,
        separateCompetitors: true,
        unreviewedPolicy: "flag",
      },
      transaction,
    });
    // a call left from an earlier seed whose columns were rolled back (migrations down and up) is put right
    if (call.reviewMode !== "distributed") await call.update({ reviewMode: "distributed", reviewsPerSubmitter: 4, separateCompetitors: true, unreviewedPolicy: "flag" }, { transaction });
    const telescopes = await Telescope.findAll({ include: [{ model: Instrument, as: "instruments", include: [{ model: Filter, as: "filters" }] }], transaction });
    const byAperture = (a: "2.4" | "1.0") => telescopes.find((t) => t.apertureM === Number(a));
    if (!(await CallOffer.count({ where: { callId: call.id }, transaction }))) {
      await CallOffer.bulkCreate(
        telescopes.flatMap((t) => (["dark", "grey", "bright"] as const).map((moonCategory) => ({ callId: call.id, telescopeId: t.id, moonCategory, hoursOffered: t.apertureM >= 2 ? 60 : 90 }))),
        { transaction },
      );
    }
    const audits: { actorId: number; action: string; entityType: string; entityId: number; proposalId: number; details: Record<string, unknown> }[] = [];
    let serial = (await Proposal.max<number, Proposal>("serial", { where: { callId: call.id }, transaction })) ?? 0;
    for (const [index, d] of demos.entries()) {
      const found = await Proposal.findOne({ where: { title: d.title }, transaction });
      if (found) {
        if (!found.designatedReviewerId) await found.update({ designatedReviewerId: (await userFor(d.reviewerCoi ?? d.pi, transaction)).id }, { transaction });
        continue;
      }
      const pi = await userFor(d.pi, transaction);
      const coi = d.reviewerCoi ? await userFor(d.reviewerCoi, transaction) : null;
      serial += 1;
      const submittedAt = new Date(call.deadlineAt.getTime() - (1 + index) * DAY);
      const proposal = await Proposal.create(
        {
          callId: call.id,
          code: proposalCode(call.semesterCode, serial),
          serial,
          title: d.title,
          abstract: `${d.title}: one field observed six times in the semester with the ${d.telescope} m in ${d.moon} time, to the signal-to-noise the measurement needs. A pilot programme of the submitter-reviewed call.`,
          scienceCategory: d.category,
          status: "in_review",
          isMultiSemester: false,
          semestersRequested: [call.semesterCode],
          isTargetOfOpportunity: false,
          submittedAt,
          createdById: pi.id,
          designatedReviewerId: (coi ?? pi).id,
        },
        { transaction },
      );
      await ProposalMember.bulkCreate(
        [
          { proposalId: proposal.id, userId: pi.id, email: pi.email, role: "pi" as const, acceptedAt: proposal.createdAt },
          ...(coi ? [{ proposalId: proposal.id, userId: coi.id, email: coi.email, role: "coi" as const, acceptedAt: proposal.createdAt }] : []),
        ],
        { transaction },
      );
      const telescope = byAperture(d.telescope)!;
      const instrument = telescope.instruments![0];
      const filter = instrument.filters!.find((f) => f.band === "V") ?? instrument.filters![0];
      const target = await Target.create(
        { proposalId: proposal.id, name: d.target.name, raDeg: Math.round(((d.target.ra + turn) % 360) * 1e4) / 1e4, decDeg: d.target.dec, pmRaMasPerYr: null, pmDecMasPerYr: null, magnitude: d.target.mag, band: filter.band, notes: null },
        { transaction },
      );
      await Observation.create(
        {
          proposalId: proposal.id,
          targetId: target.id,
          instrumentId: instrument.id,
          filterId: filter.id,
          snrGoal: 50,
          exposureSeconds: null,
          framesPerEpoch: 6,
          epochsPerSemester: 6,
          baselineYears: null,
          requiredPmPrecisionMasPerYr: null,
          moonCategory: d.moon,
          maxAirmass: 2,
          seeingArcsec: 1.2,
        },
        { transaction },
      );
      const bytes = await scienceCasePdf(d.title, 2);
      await StoredFile.create(
        {
          proposalId: proposal.id,
          kind: "science_case",
          filename: `science-case-${proposal.id}.pdf`,
          contentType: "application/pdf",
          sizeBytes: bytes.byteLength,
          sha256: createHash("sha256").update(bytes).digest("hex"),
          pageCount: 2,
          data: Buffer.from(bytes),
          uploadedById: pi.id,
        },
        { transaction },
      );
      audits.push({ actorId: pi.id, action: "proposal.created", entityType: "proposal", entityId: proposal.id, proposalId: proposal.id, details: { seeded: true, semesterCode: call.semesterCode } });
      audits.push({ actorId: pi.id, action: "proposal.reviewer_designated", entityType: "proposal", entityId: proposal.id, proposalId: proposal.id, details: { seeded: true, after: (coi ?? pi).id, email: (coi ?? pi).email } });
      audits.push({ actorId: pi.id, action: "proposal.submitted", entityType: "proposal", entityId: proposal.id, proposalId: proposal.id, details: { code: proposal.code, seeded: true } });
    }
    await AuditEntry.bulkCreate(audits, { transaction });
    return call;
  });

  // the review, in a second transaction: the competitor rule reads the feasibility sheets, which
  // load the committed proposals outside this transaction
  await sequelize.transaction(async (transaction) => {
    const call = (await Call.findOne({ where: { semesterCode }, transaction }))!;
    // started, the designated reviewers on the panel, the suggestion committed
    const proposals = await Proposal.findAll({ where: { callId: call.id, status: "in_review" }, order: [["serial", "ASC"]], transaction });
    const designated = [...new Set(proposals.map((p) => p.designatedReviewerId).filter((id): id is number => Boolean(id)))];
    for (const reviewerId of designated) await ReviewPanelMember.findOrCreate({ where: { callId: call.id, reviewerId }, defaults: { callId: call.id, reviewerId, listMailedAt: now }, transaction });
    const reviewDeadlineAt = new Date(now.getTime() + 9 * DAY);
    const [review] = await CallReview.findOrCreate({ where: { callId: call.id }, defaults: { callId: call.id, reviewDeadlineAt, perProposal: 3, startedAt: now, committedAt: now }, transaction });
    await review.update({ reviewDeadlineAt, startedAt: review.startedAt ?? now, committedAt: now }, { transaction });
    const facts = await callFacts({ callId: call.id, transaction });
    if (!facts) return;
    const suggestion = suggestAssignments({
      proposals: facts.proposals.map((p) => ({ proposalId: p.proposalId, category: p.category })),
      reviewers: facts.panel.map((r) => ({ reviewerId: r.reviewerId, categories: r.categories })),
      perProposal: facts.panel.length,
      perReviewer: call.reviewsPerSubmitter,
      isConflict: (p, r) => facts.conflicts.has(pairKey(p, r)),
    });
    // reviews partly in: the first four reviewers have submitted all of theirs, the next three one
    // each (and a draft), the last three nothing yet
    const order = facts.panel.map((r) => r.reviewerId);
    const seen = new Map<number, number>();
    for (const pair of suggestion.assignments) {
      if (await ReviewAssignment.findOne({ where: { proposalId: pair.proposalId, reviewerId: pair.reviewerId }, transaction })) continue;
      const rank = order.indexOf(pair.reviewerId);
      const nth = seen.get(pair.reviewerId) ?? 0;
      seen.set(pair.reviewerId, nth + 1);
      const submitted = rank < 4 || (rank < 7 && nth === 0);
      const draft = !submitted && rank < 7 && nth === 1;
      const base = 4.5 + ((pair.proposalId * 5) % 9) / 2; // 4.5 … 8.5 per proposal
      const bias = rank % 3 === 0 ? 1 : rank % 3 === 1 ? -1 : 0; // some lenient, some harsh
            const text = [comments[(pair.proposalId + rank) % comments.length], technical[pair.proposalId % technical.length], endings[(rank + nth) % endings.length]].join(" ");
      await ReviewAssignment.create(
        {
          callId: call.id,
          proposalId: pair.proposalId,
          reviewerId: pair.reviewerId,
          committedAt: now,
          ...demoReviewGrades({ submitted, draft, merit: base + bias, now }),
          commentToPi: submitted ? text : draft ? comments[rank % comments.length] : null,
          commentToCommittee: null,
        },
        { transaction },
      );
    }
  });
}

export async function down() {}
