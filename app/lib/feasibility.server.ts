// Loads what the feasibility sheet needs from the database and hands it to the pure computation
// in ./feasibility.ts. Callers check access first (getProposalForUser); this module only reads.
import { altitudeCurve } from "~/lib/astro/visibility";
import { buildFeasibilitySheet, type FeasibilityInput, type FeasibilitySheet } from "~/lib/feasibility";
import { Call, CallOffer, Filter, Instrument, Observation, PlannedEpoch, Proposal, Target, Telescope } from "~/models/index.server";
import { magnitudesOf } from "~/models/Target";
import { plainInstrument } from "./office.server";

export type { FeasibilitySheet } from "~/lib/feasibility";

export class FeasibilityNotFound extends Error {}

export async function loadFeasibilityInput({ proposalId }: { proposalId: number }): Promise<FeasibilityInput> {
  const proposal = await Proposal.findByPk(proposalId);
  if (!proposal) throw new FeasibilityNotFound(`No proposal ${proposalId}`);
  const [call, targets, observations, telescopes, calls] = await Promise.all([
    Call.findByPk(proposal.callId, { include: [{ model: CallOffer, as: "offers" }] }),
    Target.findAll({ where: { proposalId }, order: [["id", "ASC"]] }),
    Observation.findAll({ where: { proposalId }, include: [{ model: PlannedEpoch, as: "epochs" }], order: [["id", "ASC"]] }),
    Telescope.findAll({ include: [{ model: Instrument, as: "instruments", include: [{ model: Filter, as: "filters" }] }] }),
    Call.findAll({ attributes: ["semesterCode", "semesterStart", "semesterEnd"] }),
  ]);
  if (!call) throw new FeasibilityNotFound(`No call for proposal ${proposalId}`);
  const instruments = telescopes.flatMap((t) => t.instruments ?? []);
  return {
    proposalId,
    call: {
      semesterCode: call.semesterCode,
      semesterStart: call.semesterStart,
      semesterEnd: call.semesterEnd,
      offers: (call.offers ?? []).map((o) => ({ telescopeId: o.telescopeId, moonCategory: o.moonCategory, hoursOffered: o.hoursOffered })),
      // the office's own dates for later semesters (the epoch planner's semesters)
      laterSemesters: calls
        .filter((c) => c.semesterStart > call.semesterEnd)
        .map((c) => ({ code: c.semesterCode, start: c.semesterStart, end: c.semesterEnd })),
    },
    isMultiSemester: proposal.isMultiSemester,
    semestersRequested: proposal.semestersRequested ?? [call.semesterCode],
    telescopes: telescopes.map((t) => ({
      id: t.id,
      name: t.name,
      site: { latitudeDeg: t.latitudeDeg, longitudeDeg: t.longitudeDeg, elevationM: t.elevationM, timeZone: t.timeZone },
      apertureM: t.apertureM,
      centralObstruction: t.centralObstruction,
    })),
    instruments: instruments.map(plainInstrument),
    filters: instruments.flatMap((i) =>
      (i.filters ?? []).map((f) => ({
        id: f.id,
        instrumentId: f.instrumentId,
        band: f.band,
        zeroPointPhotons: f.zeroPointPhotons,
        extinctionMagPerAirmass: f.extinctionMagPerAirmass,
        skyDarkMag: f.skyDarkMag,
        skyGreyMag: f.skyGreyMag,
        skyBrightMag: f.skyBrightMag,
      })),
    ),
    targets: targets.map((t) => ({
      id: t.id,
      name: t.name,
      raDeg: t.raDeg,
      decDeg: t.decDeg,
      pmRaMasPerYr: t.pmRaMasPerYr,
      pmDecMasPerYr: t.pmDecMasPerYr,
      magnitudes: magnitudesOf(t),
      magnitude: t.magnitude,
      band: t.band,
    })),
    observations: observations.map((o) => ({
      id: o.id,
      targetId: o.targetId,
      instrumentId: o.instrumentId,
      filterId: o.filterId,
      snrGoal: o.snrGoal,
      exposureSeconds: o.exposureSeconds,
      framesPerEpoch: o.framesPerEpoch,
      epochsPerSemester: o.epochsPerSemester,
      baselineYears: o.baselineYears,
      requiredPmPrecisionMasPerYr: o.requiredPmPrecisionMasPerYr,
      moonCategory: o.moonCategory,
      maxAirmass: o.maxAirmass,
      seeingArcsec: o.seeingArcsec,
      epochs: (o.epochs ?? []).map((e) => ({ id: e.id, date: e.date, semesterCode: e.semesterCode, status: e.status })),
    })),
  };
}

/** The proposal's feasibility sheet. Access must have been checked by the caller. */
export async function computeFeasibilitySheet({ proposalId }: { proposalId: number }): Promise<FeasibilitySheet> {
  return buildFeasibilitySheet(await loadFeasibilityInput({ proposalId }));
}

export type AltitudeChart = {
  observationId: number;
  date: string;
  minAltitudeDeg: number;
  sunset: string | null;
  sunrise: string | null;
  darkStart: string | null;
  darkEnd: string | null;
  points: { time: string; targetAltDeg: number; sunAltDeg: number; moonAltDeg: number }[];
};

/** Altitude against time for one observation's target on one night (for the sheet's chart). */
export function altitudeChartFor(input: FeasibilityInput, sheet: FeasibilitySheet, observationId: number, date: string | null): AltitudeChart | null {
  const o = sheet.observations.find((x) => x.observationId === observationId);
  const obs = input.observations.find((x) => x.id === observationId);
  if (!o || !obs) return null;
  const target = input.targets.find((t) => t.id === obs.targetId);
  const telescope = input.telescopes.find((t) => t.id === o.telescopeId);
  const night = date ?? o.visibility.bestNight ?? sheet.semesterStart;
  if (!target || !telescope) return null;
  const curve = altitudeCurve(
    telescope.site,
    { raDeg: target.raDeg, decDeg: target.decDeg, pmRaCosDecMasPerYr: target.pmRaMasPerYr ?? 0, pmDecMasPerYr: target.pmDecMasPerYr ?? 0 },
    night,
    10,
  );
  const iso = (t: number | null) => (t === null ? null : new Date(t).toISOString());
  return {
    observationId,
    date: night,
    minAltitudeDeg: o.minAltitudeDeg,
    sunset: iso(curve.night.sunset),
    sunrise: iso(curve.night.sunrise),
    darkStart: iso(curve.night.darkStart),
    darkEnd: iso(curve.night.darkEnd),
    points: curve.points,
  };
}
