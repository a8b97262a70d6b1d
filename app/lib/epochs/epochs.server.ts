// The epoch log on the database: who may record and read it, recording one epoch or a night log,
// the progress a PI sees (executed against planned, precision so far and projected, a re-plan),
// accepting the re-plan, and what multi-semester programmes are still owed.
import { Refusal } from "~/lib/forms";
import { Op, type Transaction } from "sequelize";
import { EPOCH_TOLERANCE_NIGHTS } from "~/lib/astro/astrometry";
import { DAY_MS, dateOfDayNumber, dayNumber, localDate } from "~/lib/astro/time";
import { writeAudit } from "~/lib/audit.server";
import type { SessionUser } from "~/lib/auth/auth.server";
import { baselineSemesters, type FeasibilitySheet } from "~/lib/proposals/feasibility";
import { feasibilitySheetOf, loadFeasibilityInput, loadFeasibilityInputs } from "~/lib/proposals/feasibility.server";
import { getProposalForUser, notFound } from "~/lib/proposals/proposals.server";
import { Call, ExecutedEpoch, Instrument, Observation, PlannedEpoch, Proposal, sequelize, Target, Telescope } from "~/models/index.server";
import type { EpochRecordSource } from "~/models/ExecutedEpoch";
import type { NightLogReport } from "./night-log-csv";
import { parseNightLogCsv } from "./night-log-csv.server";
import { isEpochOffice } from "./office-roles";
import { lostEpochsOwed } from "./owed";
import { epochPrecision, meetsRequired, parallaxFactorsAt, plannedEpochTime, precisionReached, type PrecisionReached } from "./progress";
import { replanRemaining, type Replan } from "./replan";
import { parseObservedAt, type EpochRecordInput } from "./schema";

/**
 * A proposal's epochs are read by its team, the office (admin) and, for accepted programmes, the
 * observers who log them; anyone else gets 404.
 */
export async function epochReadAccess({ user, proposalId }: { user: SessionUser; proposalId: number }) {
  if (isEpochOffice(user)) {
    const proposal = await Proposal.findByPk(proposalId);
    if (proposal && (user.roles.includes("admin") || proposal.status === "accepted")) return { proposal, isPi: false, office: true };
  }
  const access = await getProposalForUser({ proposalId, user });
  return { proposal: access.proposal, isPi: access.isPi, office: false };
}

type ObservationFacts = { id: number; targetId: number; targetName: string; floorMas: number; telescopeId: number };

async function astrometricObservations(proposalId: number, transaction?: Transaction): Promise<ObservationFacts[]> {
  const rows = await Observation.findAll({
    where: { proposalId, baselineYears: { [Op.ne]: null } },
    include: [{ model: Target, as: "target" }, { model: Instrument, as: "instrument" }],
    order: [["id", "ASC"]],
    transaction,
  });
  return rows.map((o) => ({ id: o.id, targetId: o.targetId as number, targetName: o.target?.name ?? `target ${o.targetId}`, floorMas: o.instrument?.astrometricFloorMas ?? 0, telescopeId: o.instrument?.telescopeId as number }));
}

function refuse(message: string, field: string, status: 400 | 403 | 409 = 400): never {
  throw new Refusal(message, { status: status, field: field });
}

/** Saves one epoch (inside `transaction`): its precision, the planned epoch it fulfils, the audit row. */
async function saveEpoch(a: { user: SessionUser; proposalId: number; observation: ObservationFacts; input: EpochRecordInput; source: EpochRecordSource; transaction: Transaction }) {
  const { input, observation, transaction } = a;
  const observedAt = parseObservedAt(input.observedAt) as Date;
  const precision = input.lost ? null : epochPrecision({ precisionMas: input.precisionMas, fwhmArcsec: input.fwhmArcsec, snr: input.snr, frames: input.frames, floorMas: observation.floorMas });
  // the nearest still-planned epoch within its tolerance window is the one this fulfils (or loses)
  const candidates = await PlannedEpoch.findAll({ where: { observationId: observation.id, status: "planned" }, transaction, lock: transaction.LOCK.UPDATE });
  const reach = (EPOCH_TOLERANCE_NIGHTS + 1) * DAY_MS;
  const near = candidates
    .map((p) => ({ p, d: Math.abs(new Date(`${p.date}T23:59:00Z`).getTime() - observedAt.getTime()) }))
    .filter((x) => x.d <= reach)
    .sort((x, y) => x.d - y.d)[0]?.p;
  if (near) await near.update({ status: input.lost ? "missed" : "observed", observedAt }, { transaction });
  const row = await ExecutedEpoch.create(
    {
      observationId: observation.id,
      plannedEpochId: near?.id ?? null,
      observedAt,
      telescopeId: input.telescopeId,
      frames: input.frames,
      fwhmArcsec: input.fwhmArcsec ?? null,
      snr: input.snr ?? null,
      precisionMas: precision?.precisionMas ?? null,
      precisionSource: precision?.source ?? null,
      lostCause: input.lost?.cause ?? null,
      note: input.note ?? null,
      source: a.source,
      recordedById: a.user.id,
    },
    { transaction },
  );
  await writeAudit(
    {
      actorId: a.user.id,
      action: input.lost ? "epoch.lost" : "epoch.executed",
      entityType: "executed_epoch",
      entityId: row.id,
      proposalId: a.proposalId,
      details: { observationId: observation.id, observedAt: observedAt.toISOString(), telescopeId: input.telescopeId, frames: input.frames, precisionMas: row.precisionMas, precisionSource: row.precisionSource, lostCause: row.lostCause, plannedEpochId: row.plannedEpochId, source: a.source },
    },
    transaction,
  );
  return row;
}

/** Records one epoch of an accepted astrometry programme (the office's form and the API). */
export async function recordEpoch({ user, proposalId, input, source }: { user: SessionUser; proposalId: number; input: EpochRecordInput; source: EpochRecordSource }) {
  return sequelize.transaction(async (transaction) => {
    const proposal = await Proposal.findByPk(proposalId, { transaction, lock: transaction.LOCK.UPDATE });
    if (!proposal) notFound();
    if (proposal.status !== "accepted") refuse(`This proposal is ${proposal.status.replace("_", " ")}: epochs are logged for accepted programmes only.`, "proposalId", 409);
    const observations = await astrometricObservations(proposalId, transaction);
    if (observations.length === 0) refuse("This programme has no astrometric observation (one with a baseline) to log epochs for.", "observationId", 409);
    let observation: ObservationFacts | undefined;
    if (input.observationId === undefined) {
      if (observations.length > 1) refuse(`observationId is required: this programme has ${observations.length} astrometric observations (${observations.map((o) => `${o.id} ${o.targetName}`).join(", ")}).`, "observationId");
      observation = observations[0];
    } else {
      observation = observations.find((o) => o.id === input.observationId);
      if (!observation) refuse("observationId is not one of this programme's astrometric observations.", "observationId");
    }
    if (!(await Telescope.findByPk(input.telescopeId, { transaction, attributes: ["id"] }))) refuse("telescopeId is not a telescope of the observatory.", "telescopeId");
    const at = (parseObservedAt(input.observedAt) as Date).getTime();
    const twin = await ExecutedEpoch.findOne({ where: { observationId: observation.id, observedAt: { [Op.between]: [new Date(at - 59_999), new Date(at + 59_999)] } }, transaction });
    if (twin) refuse("This epoch is already in the log (same observation within a minute).", "observedAt", 409);
    return saveEpoch({ user, proposalId, observation, input, source, transaction });
  });
}

/** The accepted programmes with an astrometric observation: the office's list and the night log's context. */
export async function astrometryProgrammes() {
  const proposals = await Proposal.findAll({ where: { status: "accepted" }, include: [{ model: Call, as: "call" }], order: [["id", "ASC"]] });
  const observations = proposals.length
    ? await Observation.findAll({ where: { proposalId: proposals.map((p) => p.id), baselineYears: { [Op.ne]: null } }, include: [{ model: Target, as: "target" }], order: [["id", "ASC"]] })
    : [];
  const obsIds = observations.map((o) => o.id);
  const [planned, executed] = obsIds.length
    ? await Promise.all([PlannedEpoch.findAll({ where: { observationId: obsIds }, raw: true }), ExecutedEpoch.findAll({ where: { observationId: obsIds }, raw: true })])
    : [[], []];
  return proposals
    .map((p) => {
      const mine = observations.filter((o) => o.proposalId === p.id);
      const ids = new Set(mine.map((o) => o.id));
      const ex = executed.filter((e) => ids.has(e.observationId as number));
      return {
        proposalId: p.id,
        code: p.code ?? `#${p.id}`,
        title: p.title,
        semesterCode: p.call?.semesterCode ?? "",
        observations: mine.map((o) => ({ observationId: o.id, targetName: o.target?.name ?? `target ${o.targetId}` })),
        executed: ex.filter((e) => !e.lostCause).length,
        lost: ex.filter((e) => e.lostCause).length,
        remaining: planned.filter((e) => ids.has(e.observationId as number) && e.status === "planned").length,
      };
    })
    .filter((p) => p.observations.length > 0);
}

/** Imports a night log: every accepted row saved in one transaction, each with its audit row. */
export async function importNightLog({ user, csv }: { user: SessionUser; csv: string }): Promise<{ report: NightLogReport; saved: number }> {
  const programmes = await astrometryProgrammes();
  const telescopes = (await Telescope.findAll({ attributes: ["id", "name"] })).map((t) => ({ id: t.id, name: t.name }));
  const obsIds = programmes.flatMap((p) => p.observations.map((o) => o.observationId));
  const existing = obsIds.length ? (await ExecutedEpoch.findAll({ where: { observationId: obsIds }, attributes: ["observationId", "observedAt"], raw: true })).map((e) => ({ observationId: e.observationId as number, observedAt: new Date(e.observedAt).getTime() })) : [];
  const report = parseNightLogCsv(csv, { programmes, telescopes, existing });
  const ok = report.rows.filter((r) => r.ok);
  if (report.error || ok.length === 0) return { report, saved: 0 };
  await sequelize.transaction(async (transaction) => {
    const facts = new Map<number, ObservationFacts>();
    for (const row of ok) {
      if (!facts.has(row.proposalId)) for (const o of await astrometricObservations(row.proposalId, transaction)) facts.set(o.id, o);
      await saveEpoch({ user, proposalId: row.proposalId, observation: facts.get(row.record.observationId) as ObservationFacts, input: row.record, source: "night-log", transaction });
    }
  });
  return { report, saved: ok.length };
}

export type ExecutedOut = {
  id: number;
  observationId: number;
  targetId: number;
  observedAt: string;
  telescopeId: number;
  frames: number;
  fwhmArcsec: number | null;
  snr: number | null;
  precisionMas: number | null;
  precisionSource: "given" | "derived" | null;
  lost?: { cause: "weather" | "technical" };
  parallaxFactors: { ra: number; dec: number };
  note: string | null;
};
export type PlannedOut = { id: number; observationId: number; targetId: number; date: string; semesterCode: string; parallaxFactors: { ra: number; dec: number } };
export type ObservationProgress = {
  observationId: number;
  targetId: number;
  targetName: string;
  telescopeId: number;
  perEpochPrecisionMas: number | null;
  hoursPerEpoch: number;
  reachedSoFar: PrecisionReached;
  projected: PrecisionReached;
  required: { properMotionPrecisionMasPerYr: number | null };
  metSoFar: boolean | null;
  metProjected: boolean | null;
  replan: Replan | null;
  replanProjected: PrecisionReached | null;
  parallaxCurve: { date: string; ra: number; dec: number }[];
};

/** The sheet's parallax-factor curve (the call's baseline), reaching back to epochs taken before it. */
function curveOver(target: { raDeg: number; decDeg: number }, curve: { date: string; ra: number; dec: number }[], dates: string[]) {
  const first = [...dates].sort()[0];
  if (!first || (curve.length && first >= curve[0].date)) return curve;
  const end = curve.length ? curve[0].date : [...dates].sort().at(-1)!;
  const before: { date: string; ra: number; dec: number }[] = [];
  for (let d = dayNumber(first); dateOfDayNumber(d) < end; d += 7) before.push({ date: dateOfDayNumber(d), ...parallaxFactorsAt(target.raDeg, target.decDeg, d * DAY_MS) });
  return [...before, ...curve];
}

function sheetObservation(sheet: FeasibilitySheet, observationId: number) {
  return sheet.observations.find((o) => o.observationId === observationId) ?? null;
}

/**
 * Progress of a proposal's astrometric observations. The top-level `reachedSoFar`, `projected` and
 * `required` are those of `observationId` (default: the first astrometric observation).
 */
export async function epochProgress({ proposalId, observationId, withReplan = true, now = new Date() }: { proposalId: number; observationId?: number; withReplan?: boolean; now?: Date }) {
  const input = await loadFeasibilityInput({ proposalId });
  const sheet = feasibilitySheetOf(input);
  const observations = input.observations.filter((o) => o.baselineYears !== null);
  const ids = observations.map((o) => o.id);
  const [executedRows, plannedRows] = ids.length
    ? await Promise.all([
        ExecutedEpoch.findAll({ where: { observationId: ids }, order: [["observedAt", "ASC"], ["id", "ASC"]] }),
        PlannedEpoch.findAll({ where: { observationId: ids, status: "planned" }, order: [["date", "ASC"], ["id", "ASC"]] }),
      ])
    : [[], []];
  const executed: ExecutedOut[] = [];
  const planned: PlannedOut[] = [];
  const perObservation: ObservationProgress[] = [];
  for (const obs of observations) {
    const target = input.targets.find((t) => t.id === obs.targetId);
    const instrument = input.instruments.find((i) => i.id === obs.instrumentId);
    const telescope = input.telescopes.find((t) => t.id === instrument?.telescopeId);
    if (!target || !instrument || !telescope) continue;
    const so = sheetObservation(sheet, obs.id);
    const perEpoch = so?.astrometry?.perEpochPrecisionMas ?? null;
    const mineExecuted = executedRows.filter((e) => e.observationId === obs.id);
    const minePlanned = plannedRows.filter((e) => e.observationId === obs.id);
    for (const e of mineExecuted) {
      executed.push({
        id: e.id,
        observationId: obs.id,
        targetId: target.id,
        observedAt: e.observedAt.toISOString(),
        telescopeId: e.telescopeId as number,
        frames: e.frames,
        fwhmArcsec: e.fwhmArcsec,
        snr: e.snr,
        precisionMas: e.precisionMas,
        precisionSource: e.precisionSource,
        ...(e.lostCause ? { lost: { cause: e.lostCause } } : {}),
        parallaxFactors: parallaxFactorsAt(target.raDeg, target.decDeg, e.observedAt.getTime()),
        note: e.note,
      });
    }
    for (const p of minePlanned) {
      planned.push({ id: p.id, observationId: obs.id, targetId: target.id, date: p.date, semesterCode: p.semesterCode, parallaxFactors: parallaxFactorsAt(target.raDeg, target.decDeg, plannedEpochTime(p.date, telescope.site.longitudeDeg)) });
    }
    const taken = mineExecuted.filter((e) => !e.lostCause && e.precisionMas !== null).map((e) => ({ time: e.observedAt.getTime(), sigmaMas: e.precisionMas as number }));
    const reachedSoFar = precisionReached(target.raDeg, target.decDeg, taken);
    const ahead = perEpoch === null ? [] : minePlanned.map((p) => ({ time: plannedEpochTime(p.date, telescope.site.longitudeDeg), sigmaMas: perEpoch }));
    const projected = precisionReached(target.raDeg, target.decDeg, [...taken, ...ahead]);
    const required = obs.requiredPmPrecisionMasPerYr;
    const hoursPerEpoch = (so?.timePerEpoch.totalSeconds ?? 0) / 3600;
    let replan: Replan | null = null;
    let replanProjected: PrecisionReached | null = null;
    if (withReplan && perEpoch !== null && minePlanned.length > 0) {
      replan = replanRemaining({
        site: telescope.site,
        target,
        semesters: baselineSemesters(input.call, obs.baselineYears as number),
        remaining: minePlanned.map((p) => ({ date: p.date, semesterCode: p.semesterCode })),
        executed: taken,
        perEpochPrecisionMas: perEpoch,
        maxAirmass: obs.maxAirmass,
        requiredPmMasPerYr: required,
        secondsPerEpoch: so?.timePerEpoch.totalSeconds ?? 0,
        toleranceNights: obs.epochToleranceNights ?? EPOCH_TOLERANCE_NIGHTS,
        today: localDate(now.getTime(), telescope.site.timeZone),
      });
      if (replan && replan.dates.length) {
        replanProjected = precisionReached(target.raDeg, target.decDeg, [...taken, ...replan.dates.map((d) => ({ time: plannedEpochTime(d.date, telescope.site.longitudeDeg), sigmaMas: perEpoch }))]);
      }
    }
    perObservation.push({
      observationId: obs.id,
      targetId: target.id,
      targetName: target.name,
      telescopeId: telescope.id,
      perEpochPrecisionMas: perEpoch === null ? null : Math.round(perEpoch * 1e4) / 1e4,
      hoursPerEpoch: Math.round(hoursPerEpoch * 1000) / 1000,
      reachedSoFar,
      projected,
      required: { properMotionPrecisionMasPerYr: required },
      metSoFar: meetsRequired(reachedSoFar, required),
      metProjected: meetsRequired(projected, required),
      replan,
      replanProjected,
      parallaxCurve: curveOver(target, so?.astrometry?.parallaxCurve ?? [], mineExecuted.map((e) => e.observedAt.toISOString().slice(0, 10))),
    });
  }
  const main = (observationId !== undefined ? perObservation.find((o) => o.observationId === observationId) : perObservation[0]) ?? null;
  if (observationId !== undefined && !main) refuse("observationId is not one of this proposal's astrometric observations.", "observationId");
  return {
    proposalId,
    executed,
    planned,
    reachedSoFar: main?.reachedSoFar ?? null,
    projected: main?.projected ?? null,
    required: main?.required ?? null,
    observations: perObservation,
    conventions: {
      precision: "given precisionMas as measured; otherwise FWHM / (2.355 · SNR per frame) / √frames with the instrument's floor in quadrature",
      fit: "five-parameter weighted least squares (position, proper motion, parallax) over the executed epochs' times and precisions; covariance (AᵀWA)⁻¹",
      plannedTimes: "a planned epoch counts at the site's local midnight of its night, at the feasibility sheet's per-epoch precision",
    },
  };
}

export type EpochProgress = Awaited<ReturnType<typeof epochProgress>>;

/** The PI accepts the re-plan they saw: the remaining planned epochs are replaced, audited. */
export async function acceptReplan({ user, proposalId, observationId, dates, now = new Date() }: { user: SessionUser; proposalId: number; observationId: number; dates: string[]; now?: Date }) {
  const access = await getProposalForUser({ proposalId, user });
  if (!access.isPi) refuse("Only the PI can accept a re-plan.", "form", 403);
  if (access.proposal.status !== "accepted") refuse("Only an accepted programme's epochs can be re-planned.", "form", 409);
  const progress = await epochProgress({ proposalId, observationId, now });
  const mine = progress.observations.find((o) => o.observationId === observationId);
  const fresh = mine?.replan?.dates ?? [];
  if (!mine || fresh.length === 0) refuse("There is no re-plan for this observation.", "form", 409);
  if (fresh.map((d) => d.date).join(",") !== dates.join(",")) refuse("The re-plan has changed since you looked (an epoch was logged meanwhile). Look at the new one and accept again.", "form", 409);
  await sequelize.transaction(async (transaction) => {
    const old = await PlannedEpoch.findAll({ where: { observationId, status: "planned" }, transaction, lock: transaction.LOCK.UPDATE });
    await PlannedEpoch.destroy({ where: { id: old.map((e) => e.id) }, transaction });
    await PlannedEpoch.bulkCreate(fresh.map((d) => ({ observationId, date: d.date, semesterCode: d.semesterCode, status: "planned" as const, observedAt: null })), { transaction });
    await writeAudit(
      { actorId: user.id, action: "epochs.replanned", entityType: "observation", entityId: observationId, proposalId, details: { before: old.map((e) => e.date), after: fresh.map((d) => d.date) } },
      transaction,
    );
  });
  return { replaced: fresh.length };
}

/**
 * What accepted multi-semester programmes of earlier calls still owe in `semesterCode`'s call:
 * lost epochs not yet made up (owed.ts), planned epochs whose tolerance window has passed without
 * a record, and the hours these take (at each observation's time per epoch from its feasibility sheet).
 */
export async function owedBeforeCall({ callId, now = new Date() }: { callId: number; now?: Date }) {
  const call = await Call.findByPk(callId);
  if (!call) return [];
  const proposals = await Proposal.findAll({ where: { status: "accepted", isMultiSemester: true, callId: { [Op.ne]: callId } }, include: [{ model: Call, as: "call" }] });
  const earlier = proposals.filter((p) => p.call && p.call.semesterStart < call.semesterStart);
  if (earlier.length === 0) return [];
  const inputs = await loadFeasibilityInputs({ proposalIds: earlier.map((p) => p.id), proposals: earlier });
  const overdue = dateOfDayNumber(Math.floor(now.getTime() / DAY_MS) - EPOCH_TOLERANCE_NIGHTS - 1);
  const out: { proposalId: number; code: string; title: string; lostEpochs: number; madeUpEpochs: number; overdueEpochs: number; hoursOwed: number; executedEpochs: number }[] = [];
  for (const p of earlier) {
    const input = inputs.get(p.id);
    if (!input) continue;
    const obsIds = input.observations.filter((o) => o.baselineYears !== null).map((o) => o.id);
    if (obsIds.length === 0) continue;
    const sheet = feasibilitySheetOf(input);
    const records = await ExecutedEpoch.findAll({ where: { observationId: obsIds }, attributes: ["observationId", "lostCause", "plannedEpochId", "observedAt"], raw: true });
    let lost = 0;
    let madeUp = 0;
    let owedLost = 0;
    let late = 0;
    let executedEpochs = 0;
    let hours = 0;
    for (const o of input.observations.filter((x) => obsIds.includes(x.id))) {
      const h = (sheetObservation(sheet, o.id)?.timePerEpoch.totalSeconds ?? 0) / 3600;
      const mine = records.filter((r) => r.observationId === o.id);
      const losses = lostEpochsOwed(mine.map((r) => ({ observedAt: new Date(r.observedAt).getTime(), lost: r.lostCause !== null, planned: r.plannedEpochId !== null })));
      const d = o.epochs.filter((e) => e.status === "planned" && e.date < overdue).length;
      lost += losses.lost;
      madeUp += losses.madeUp;
      owedLost += losses.owed;
      late += d;
      executedEpochs += mine.filter((r) => !r.lostCause).length;
      hours += (losses.owed + d) * h;
    }
    if (owedLost + late === 0) continue;
    out.push({ proposalId: p.id, code: p.code ?? `#${p.id}`, title: p.title, lostEpochs: lost, madeUpEpochs: madeUp, overdueEpochs: late, hoursOwed: Math.round(hours * 100) / 100, executedEpochs });
  }
  return out;
}

/** Telescopes for the office's form. */
export async function telescopeChoices() {
  return (await Telescope.findAll({ attributes: ["id", "name"], order: [["id", "ASC"]] })).map((t) => ({ id: t.id, name: t.name }));
}
