// Set-up shared by the proposal tests: a call of their own (so deadlines can be moved), and
// proposals built through the data layer up to "ready to submit".
import { PDFDocument, StandardFonts } from "pdf-lib";
import { instrumentOptions, createObservation } from "~/lib/proposals/observations.server";
import { createTarget } from "~/lib/proposals/targets.server";
import { createProposal, updateOverview, type Actor } from "~/lib/proposals/proposals.server";
import { observationSchema, targetSchema } from "~/lib/schemas/proposals";
import { storeScienceCase } from "~/lib/proposals/science-case.server";
import { Call, CallOffer, Telescope } from "~/models/index.server";

/** A call open now, with the seeded telescopes on offer; semester dates of 2027A, a code of its own. */
export async function testCall({ deadlineInDays = 20 }: { deadlineInDays?: number } = {}) {
  let semesterCode = "";
  do semesterCode = `${2100 + Math.floor(Math.random() * 800)}${Math.random() < 0.5 ? "A" : "B"}`;
  while (await Call.findOne({ where: { semesterCode } }));
  const call = await Call.create({
    semesterCode,
    title: `Test call ${semesterCode}`,
    opensAt: new Date(Date.now() - 86_400_000),
    deadlineAt: new Date(Date.now() + deadlineInDays * 86_400_000),
    semesterStart: "2027-02-01",
    semesterEnd: "2027-07-31",
    pageLimit: 4,
  });
  for (const telescope of await Telescope.findAll()) {
    for (const moonCategory of ["dark", "grey", "bright"] as const) {
      await CallOffer.create({ callId: call.id, telescopeId: telescope.id, moonCategory, hoursOffered: 300 });
    }
  }
  return call;
}

export async function pdfWithPages(pages: number) {
  const doc = await PDFDocument.create();
  const font = await doc.embedFont(StandardFonts.Helvetica);
  for (let i = 0; i < pages; i++) doc.addPage([595, 842]).drawText(`Science case, page ${i + 1}`, { x: 72, y: 770, size: 14, font });
  return doc.save();
}

export const goodTarget = { name: "Hollowmere Field 1", ra: "13:05:20.0", dec: "+22:10:00", pmra: "-4.2", pmdec: "1.1", magnitude: "15.5", band: "V", notes: "" };

/** A draft with overview, one target, one observation and a 2-page science case: ready to submit. */
export async function readyProposal({ user, callId, title = "Proper motions in the Hollowmere cluster field" }: { user: Actor; callId: number; title?: string }) {
  const proposal = await createProposal({ user, callId, title, abstract: "" });
  await updateOverview({
    user,
    proposalId: proposal.id,
    version: proposal.version,
    title,
    abstract: "We measure proper motions of members of an invented open cluster field over three years.",
    scienceCategory: "clusters-astrometry",
    isMultiSemester: false,
    semestersRequested: [],
    isTargetOfOpportunity: false,
  });
  const target = await createTarget({ user, proposalId: proposal.id, input: targetSchema.parse(goodTarget) });
  const [option] = await instrumentOptions({ callId });
  const filter = option.filters.find((f) => f.band === "V") ?? option.filters[0];
  await createObservation({
    user,
    proposalId: proposal.id,
    input: observationSchema.parse({
      targetId: target.id,
      instrumentId: option.instrumentId,
      filterId: filter.id,
      mode: "snr",
      snrGoal: "50",
      framesPerEpoch: "3",
      epochsPerSemester: "1",
      moonCategory: "dark",
      maxAirmass: "2",
      seeingArcsec: "1.2",
    }),
  });
  await storeScienceCase({ proposalId: proposal.id, user, file: { name: "case.pdf", type: "application/pdf", bytes: await pdfWithPages(2) } });
  return { proposal, target, option, filter };
}

/**
 * A ready proposal with a second observation for multi-epoch astrometry (2 epochs per semester
 * over a 2-year baseline, 1.5 mas/yr wanted): the programme the epoch-log tests record against.
 */
export async function epochProgramme({ user, callId, title }: { user: Actor; callId: number; title: string }) {
  const made = await readyProposal({ user, callId, title });
  await createObservation({
    user,
    proposalId: made.proposal.id,
    input: observationSchema.parse({
      targetId: made.target.id, instrumentId: made.option.instrumentId, filterId: made.filter.id, mode: "snr", snrGoal: "120", framesPerEpoch: "5",
      epochsPerSemester: "2", moonCategory: "dark", maxAirmass: "1.8", seeingArcsec: "1.0", baselineYears: "2", requiredPmPrecisionMasPerYr: "1.5",
    }),
  });
  return made;
}
