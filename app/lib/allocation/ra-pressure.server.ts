// RA pressure of one telescope for a call (issue 12): loads the call, the telescope's site and
// clear fractions, and the board's proposals' feasibility sheets, then hands plain data to the
// pure computation in ./ra-pressure.ts. Callers check the role first (chair).
import { Refusal } from "~/lib/forms";
import { Op } from "sequelize";
import { limitAltitude, prepareSiteNights } from "~/lib/astro/visibility";
import { moonCategories } from "~/lib/domain";
import { nightsInSemester, type FeasibilitySheet } from "~/lib/proposals/feasibility";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { callNotFound } from "~/lib/review/chair.server";
import { Call, CallOffer, Proposal, Telescope, TelescopeClearFraction } from "~/models/index.server";
import { BOARD_STATES } from "./board.server";
import { raPressure, type RaObservation } from "./ra-pressure";

const round = (x: number, digits = 3) => Math.round(x * 10 ** digits) / 10 ** digits;

function telescopeNotOffered(semesterCode: string): never {
  const message = `That telescope offers no time in call ${semesterCode}.`;
  throw new Refusal(message, { status: 404, field: "telescopeId" });
}

/** Telescopes with hours offered in the call, in id order. */
export async function offeredTelescopes({ callId }: { callId: number }) {
  const offers = await CallOffer.findAll({ where: { callId, hoursOffered: { [Op.gt]: 0 } }, attributes: ["telescopeId"] });
  const ids = [...new Set(offers.map((o) => o.telescopeId as number))];
  if (ids.length === 0) return [];
  const telescopes = await Telescope.findAll({ where: { id: ids }, attributes: ["id", "name"], order: [["id", "ASC"]] });
  return telescopes.map((t) => ({ id: t.id, name: t.name }));
}

/**
 * RA pressure for `telescopeId` in call `callId`: 404 (thrown) for an unknown call or a telescope
 * the call does not offer. `sheets` may bring the board's sheets already computed.
 */
export async function callRaPressure({ callId, telescopeId, sheets }: { callId: number; telescopeId: number; sheets?: Map<number, FeasibilitySheet> }) {
  const call = await Call.findByPk(callId, { include: [{ model: CallOffer, as: "offers" }] });
  if (!call) callNotFound();
  if (!(call.offers ?? []).some((o) => o.telescopeId === telescopeId && o.hoursOffered > 0)) telescopeNotOffered(call.semesterCode);
  const [telescope, fractions, proposals] = await Promise.all([
    Telescope.findByPk(telescopeId),
    TelescopeClearFraction.findAll({ where: { telescopeId }, order: [["month", "ASC"]] }),
    Proposal.findAll({ where: { callId, status: { [Op.in]: [...BOARD_STATES] } }, attributes: ["id", "code"], order: [["serial", "ASC"], ["id", "ASC"]] }),
  ]);
  if (!telescope) telescopeNotOffered(call.semesterCode);

  const observations: RaObservation[] = [];
  const failed: { proposalId: number; code: string | null }[] = [];
  for (const p of proposals) {
    let sheet = sheets?.get(p.id);
    if (!sheet) {
      try {
        sheet = await computeFeasibilitySheet({ proposalId: p.id });
      } catch (error) {
        console.error(`feasibility sheet of proposal ${p.id} failed`, error);
        failed.push({ proposalId: p.id, code: p.code });
        continue;
      }
    }
    const targets = new Map(sheet.targets.map((t) => [t.targetId, t]));
    for (const o of sheet.observations) {
      const target = targets.get(o.targetId);
      if (o.telescopeId !== telescopeId || !target) continue;
      observations.push({
        observationId: o.observationId,
        proposalId: p.id,
        target: { raDeg: target.raDeg, decDeg: target.decDeg, pmRaCosDecMasPerYr: target.pmRaMasPerYr ?? 0, pmDecMasPerYr: target.pmDecMasPerYr ?? 0 },
        minAltitudeDeg: limitAltitude({ maxAirmass: o.maxAirmass }),
        moonCategory: o.moonCategory,
        requestedHours: o.requestedHoursThisSemester,
      });
    }
  }

  const site = { latitudeDeg: telescope.latitudeDeg, longitudeDeg: telescope.longitudeDeg, elevationM: telescope.elevationM, timeZone: telescope.timeZone };
  const prepared = prepareSiteNights(site, call.semesterStart, nightsInSemester(call.semesterStart, call.semesterEnd));
  const result = raPressure({ prepared, clearFractions: fractions.map((f) => ({ month: f.month, clearFraction: f.clearFraction })), observations });
  const codeOf = new Map(proposals.map((p) => [p.id, p.code]));
  const roundSplit = (b: (typeof result.bins)[number]["byMoonCategory"]) =>
    Object.fromEntries(
      moonCategories.map((c) => [c, { darkHours: round(b[c].darkHours), availableDarkHours: round(b[c].availableDarkHours), requestedHours: round(b[c].requestedHours) }]),
    ) as typeof b;
  return {
    call: { id: call.id, semesterCode: call.semesterCode },
    telescope: { id: telescope.id, name: telescope.name },
    site: { latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM },
    semester: { start: call.semesterStart, end: call.semesterEnd, nights: result.nights },
    darkHours: round(result.darkHours),
    availableDarkHours: round(result.availableDarkHours),
    requestedHours: round(result.requestedHours),
    clearFractions: result.clearFractions,
    bins: result.bins.map((b) => ({
      raHour: b.raHour,
      darkHours: round(b.darkHours),
      availableDarkHours: round(b.availableDarkHours),
      requestedHours: round(b.requestedHours),
      byMoonCategory: roundSplit(b.byMoonCategory),
    })),
    observations: observations.length,
    unplaced: result.unplaced.map((u) => ({ ...u, code: codeOf.get(u.proposalId) ?? null, hours: round(u.hours) })),
    failedProposals: failed,
  };
}

export type CallRaPressure = Awaited<ReturnType<typeof callRaPressure>>;

/**
 * The board page's RA-pressure section: the telescopes offered, the one chosen by `?telescopeId=`
 * (default: the first offered) and its RA pressure; a value that is no offered telescope's id gives
 * a message for the selector instead of a chart.
 */
export async function raPressureSection({ callId, telescopeId: given, sheets }: { callId: number; telescopeId: string | null; sheets?: Map<number, FeasibilitySheet> }) {
  const telescopes = await offeredTelescopes({ callId });
  const chosen = given === null ? telescopes[0] : telescopes.find((t) => String(t.id) === given.trim());
  if (!chosen) {
    return {
      telescopes,
      selectedId: null,
      given,
      error: telescopes.length === 0 ? "This call offers no telescope time." : "Choose one of the telescopes this call offers.",
      result: null,
    };
  }
  return { telescopes, selectedId: chosen.id, given, error: null, result: await callRaPressure({ callId, telescopeId: chosen.id, sheets }) };
}

export type RaPressureSection = Awaited<ReturnType<typeof raPressureSection>>;
