// Demo proposals of the invented Kestrel Ridge scenario: about thirty, from the demo users and a
// few more invented PIs, in every state, each with targets, observations, planned epochs for the
// astrometric ones, Co-Is and a generated science-case PDF; plus one large survey of 500 fields.
//
// Dates: the calls are placed relative to the seeding day (demoCallPlan in the observatory
// seeder). Each demo proposal belongs to a stage: "running" (the semester now running, its
// proposals decided: accepted, waitlisted, declined), "review" (the next semester: its deadline
// has passed, the proposals are submitted and wait for the committee; one was withdrawn) or
// "open" (the call after that: drafts being written). Each proposal was written for one season
// (`half`: its targets are well placed in an A or a B semester); when the stage's semester is of
// the other half, every target's RA is turned by 12 h so that it stays well placed.
//
// Empty sky: every invented field and star lies at least 1° from every Messier object, every NGC
// or IC object brighter than magnitude 10 and every star brighter than V = 5, at its RA and at its
// RA + 12 h. This was checked with the catalogues shipped in the npm package d3-celestial
// (data/messier.json, data/dsos.14.json, data/stars.6.json — the last from Hipparcos), and
// tests/integration/demo-sky.test.ts checks it on every run. No invented star has more than
// 400 mas/yr of proper motion, and none sits within a degree of a famous high-proper-motion star
// (the test holds that short list, from memory). Idempotent: a proposal is found by its title and
// left alone when it exists. The invented data is in ../demo-proposals-data.ts; this file inserts it.
import { createHash } from "node:crypto";
import { PDFDocument, StandardFonts, rgb } from "pdf-lib";
import type { Sequelize, Transaction } from "sequelize";
import { prepareSiteNights, targetNights, limitAltitude } from "~/lib/astro/visibility";
import { officeSemesters } from "~/lib/office/semesters.server";
import { semesterOf, upcomingSemesters, type SemesterSpan } from "~/lib/semesters";
import { Call, CallOffer, Filter, Instrument, Observation, PlannedEpoch, Proposal, ProposalMember, StoredFile, Telescope, Target, User, AuditEntry } from "~/models/index.server";
import { proposalCode } from "~/lib/proposals/vocabulary";
import { demoCallPlan } from "./20261201000100-demo-observatory";
import { allDemos, demos, morePis, scienceSections, type O, type Stage, type T } from "../demo-proposals-data";

async function scienceCasePdf(title: string, pages: number): Promise<Uint8Array> {
  const doc = await PDFDocument.create();
  doc.setTitle(`Science case: ${title}`);
  doc.setCreator("Nightshare demo seed");
  const font = await doc.embedFont(StandardFonts.Helvetica);
  const bold = await doc.embedFont(StandardFonts.HelveticaBold);
  const wrap = (text: string, size: number, width: number) => {
    const lines: string[] = [];
    let line = "";
    for (const word of text.split(/\s+/)) {
      const next = line ? `${line} ${word}` : word;
      if (font.widthOfTextAtSize(next, size) > width && line) {
        lines.push(line);
        line = word;
      } else line = next;
    }
    if (line) lines.push(line);
    return lines;
  };
  const ascii = (s: string) => s.replace(/[–—]/g, "-").replace(/[^\x20-\x7e]/g, "");
  for (let p = 0; p < pages; p++) {
    const page = doc.addPage([595.28, 841.89]);
    let y = 780;
    if (p === 0) {
      for (const line of wrap(ascii(title), 16, 480)) {
        page.drawText(line, { x: 58, y, size: 16, font: bold, color: rgb(0.1, 0.1, 0.2) });
        y -= 22;
      }
      page.drawText("Science case", { x: 58, y: y - 4, size: 11, font, color: rgb(0.4, 0.4, 0.45) });
      y -= 36;
    }
    for (let k = 0; k < 3; k++) {
      const index = (p * 3 + k) % scienceSections.length;
      const [heading, text] = scienceSections[index];
      page.drawText(`${index + 1}. ${heading}`, { x: 58, y, size: 11.5, font: bold, color: rgb(0.1, 0.1, 0.2) });
      y -= 18;
      for (const line of wrap(text, 10.5, 480)) {
        page.drawText(line, { x: 58, y, size: 10.5, font });
        y -= 15;
      }
      y -= 12;
    }
    page.drawText(`page ${p + 1}`, { x: 280, y: 40, size: 9, font, color: rgb(0.5, 0.5, 0.5) });
  }
  return doc.save();
}

function longestSpan() {
  const years = Math.max(...demos.map((d) => d.obs.baseline ?? 1), 1);
  return Math.min(Math.round(years * 365.25) + 1, 366 * 6);
}

/** Epoch dates for an astrometric observation: per semester of the baseline, nights spread over the target's season. */
function plannedEpochDates(site: Parameters<typeof prepareSiteNights>[0], start: string, t: T, o: O, epochHours: number, semesters: SemesterSpan[]): string[] {
  const span = Math.min(Math.round((o.baseline ?? 1) * 365.25) + 1, 366 * 6);
  // One preparation per call start (two years, the longest demo baseline), sliced per baseline.
  const all = prepareSiteNights(site, start, longestSpan());
  const prepared = { ...all, nights: all.nights.slice(0, span) };
  const rank = { dark: 0, grey: 1, bright: 2 } as const;
  const rows = targetNights(prepared, { raDeg: t.ra, decDeg: t.dec, pmRaCosDecMasPerYr: t.pmRa ?? 0, pmDecMasPerYr: t.pmDec ?? 0 }, limitAltitude({ maxAirmass: o.airmass }));
  const bySemester = new Map<string, string[]>();
  for (const r of rows) {
    if (r.observableHours < Math.max(epochHours * 1.5, 0.75) || rank[r.night.moonCategory] > rank[o.moon]) continue;
    const s = semesterOf(r.night.date, semesters);
    bySemester.set(s, [...(bySemester.get(s) ?? []), r.night.date]);
  }
  const out: string[] = [];
  for (const dates of bySemester.values()) {
    const n = Math.min(o.epochs, dates.length);
    // Spread over the season, away from the semester's edges (where the next semester's epochs start).
    for (let i = 0; i < n; i++) out.push(dates[Math.floor(((i + 0.5) * dates.length) / n)]);
  }
  return [...new Set(out)].sort();
}

export async function up({ context: sequelize }: { context: Sequelize }) {
  await sequelize.transaction(async (transaction: Transaction) => {
    const now = new Date();
    for (const p of morePis) {
      await User.findOrCreate({
        where: { email: p.email },
        defaults: { email: p.email, name: p.name, institution: p.institution, isMemberInstitution: p.member, lastSignInAt: null },
        transaction,
      });
    }
    const plan = demoCallPlan(now);
    const found = await Promise.all([plan.running, plan.review, plan.open].map((c) => Call.findOne({ where: { semesterCode: c.semesterCode }, transaction })));
    if (found.some((c) => !c)) throw new Error("Run the demo-observatory seeder first (the three demo calls).");
    const [callRunning, callReview, callOpen] = found as Call[];
    const telescopes = await Telescope.findAll({ include: [{ model: Instrument, as: "instruments", include: [{ model: Filter, as: "filters" }] }], transaction });
    const byAperture = (a: "2.4" | "1.0") => telescopes.find((t) => t.apertureM === Number(a));
    const calls: Record<Stage, Call> = { running: callRunning, review: callReview, open: callOpen };
    const semesters = await officeSemesters(transaction);
    const users = new Map((await User.findAll({ transaction })).map((u) => [u.email, u]));
    const serials: Record<string, number> = {};
    for (const [stage, call] of Object.entries(calls)) {
      serials[stage] = (await Proposal.max<number, Proposal>("serial", { where: { callId: call.id }, transaction })) ?? 0;
    }

    const audits: { actorId: number; action: string; entityType: string; entityId: number; proposalId: number; details: Record<string, unknown> }[] = [];
    for (const [index, authored] of allDemos.entries()) {
      const call = calls[authored.stage];
      // Targets chosen for the other half of the year turn by 12 h in RA, to stay well placed.
      const turn = call.semesterCode.endsWith(authored.half) ? 0 : 180;
      const d = turn ? { ...authored, targets: authored.targets.map((t) => ({ ...t, ra: Math.round(((t.ra + turn) % 360) * 1e4) / 1e4 })) } : authored;
      const pi = users.get(d.pi);
      if (!pi) throw new Error(`Demo user ${d.pi} is missing`);
      const coded = d.coded || ["submitted", "in_review", "accepted", "waitlisted", "declined"].includes(d.status);
      const existing = await Proposal.findOne({ where: { title: d.title }, transaction });
      if (existing) continue;
      const serial = coded ? ++serials[d.stage] : null;
      // submitted in the three weeks before the call's deadline
      const submittedAt = coded ? new Date(call.deadlineAt.getTime() - (1 + (index % 20)) * 86_400_000 - (index % 8) * 3_600_000) : null;
      const proposal = await Proposal.create(
        {
          callId: call.id,
          code: serial ? proposalCode(call.semesterCode, serial) : null,
          serial,
          title: d.title,
          abstract: d.abstract,
          scienceCategory: d.category,
          status: d.status,
          isMultiSemester: Boolean(d.multi),
          semestersRequested: d.multi ? upcomingSemesters(call.semesterCode, d.multi) : [call.semesterCode],
          isTargetOfOpportunity: Boolean(d.too),
          submittedAt,
          createdById: pi.id,
        },
        { transaction },
      );
      await ProposalMember.bulkCreate(
        [
          { proposalId: proposal.id, userId: pi.id, email: pi.email, role: "pi" as const, acceptedAt: proposal.createdAt },
          ...d.cois.map((email) => {
            const u = users.get(email);
            return { proposalId: proposal.id, userId: u?.id ?? null, email, role: "coi" as const, acceptedAt: u ? proposal.createdAt : null };
          }),
        ],
        { transaction },
      );

      const telescope = byAperture(d.obs.telescope)!;
      const instrument = telescope.instruments![0];
      const filter = instrument.filters!.find((f) => f.band === d.obs.band)!;
      const site = { latitudeDeg: telescope.latitudeDeg, longitudeDeg: telescope.longitudeDeg, elevationM: telescope.elevationM, timeZone: telescope.timeZone };
      const targets = await Target.bulkCreate(
        d.targets.map((t) => ({ proposalId: proposal.id, name: t.name, raDeg: t.ra, decDeg: t.dec, pmRaMasPerYr: t.pmRa ?? null, pmDecMasPerYr: t.pmDec ?? null, magnitude: t.mag, band: t.band, notes: null })),
        { transaction },
      );
      const observations = await Observation.bulkCreate(
        targets.map((target) => ({
            proposalId: proposal.id,
            targetId: target.id,
            instrumentId: instrument.id,
            filterId: filter.id,
            snrGoal: d.obs.snr ?? null,
            exposureSeconds: d.obs.snr ? null : (d.obs.exp ?? 60),
            framesPerEpoch: d.obs.frames,
            epochsPerSemester: d.obs.epochs,
            baselineYears: d.obs.baseline ?? null,
            requiredPmPrecisionMasPerYr: d.obs.reqPm ?? null,
            moonCategory: d.obs.moon,
            maxAirmass: d.obs.airmass,
            seeingArcsec: d.obs.seeing,
        })),
        { transaction },
      );
      if (d.obs.baseline) {
        const today = now.toISOString().slice(0, 10);
        await PlannedEpoch.bulkCreate(
          observations.flatMap((observation, i) =>
            // Half an hour per epoch bounds these frame counts; the sheet computes the exact time.
            plannedEpochDates(site, call.semesterStart, d.targets[i], d.obs, 0.5, semesters).map((date) => {
              const past = date < today && d.status === "accepted";
              return { observationId: observation.id, date, semesterCode: semesterOf(date, semesters), status: past ? ("observed" as const) : ("planned" as const), observedAt: past ? new Date(`${date}T08:00:00Z`) : null };
            }),
          ),
          { transaction },
        );
      }

      if (!(d.status === "draft" && index % 4 === 0)) {
        const pages = 2 + (index % 3);
        const bytes = await scienceCasePdf(d.title, pages);
        const file = await StoredFile.create(
          {
            proposalId: proposal.id,
            kind: "science_case",
            filename: `science-case-${proposal.id}.pdf`,
            contentType: "application/pdf",
            sizeBytes: bytes.byteLength,
            sha256: createHash("sha256").update(bytes).digest("hex"),
            pageCount: pages,
            data: Buffer.from(bytes),
            uploadedById: pi.id,
          },
          { transaction },
        );
        audits.push({ actorId: pi.id, action: "science_case.uploaded", entityType: "stored_file", entityId: file.id, proposalId: proposal.id, details: { filename: file.filename, pageCount: pages, seeded: true } });
      }
      audits.push({ actorId: pi.id, action: "proposal.created", entityType: "proposal", entityId: proposal.id, proposalId: proposal.id, details: { seeded: true, semesterCode: call.semesterCode } });
      if (coded) audits.push({ actorId: pi.id, action: "proposal.submitted", entityType: "proposal", entityId: proposal.id, proposalId: proposal.id, details: { code: proposal.code, seeded: true } });
      if (d.status === "withdrawn") audits.push({ actorId: pi.id, action: "proposal.withdrawn", entityType: "proposal", entityId: proposal.id, proposalId: proposal.id, details: { code: proposal.code, seeded: true } });
    }
    await AuditEntry.bulkCreate(audits, { transaction });
  });
}

export async function down() {}

export { demos as demoProposals, scienceCasePdf };
