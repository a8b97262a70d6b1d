// Demo epoch log (INVENTED data): an observer account, and for the running semester's accepted
// astrometry programmes an executed record for each planned epoch already past (invented FWHM
// and SNR around the observation's own seeing and SNR goal), every third of them lost instead —
// weather or technical — with a make-up epoch three nights later for every loss but the first and a
// spare-time epoch, so that the PIs' Epoch progress shows a precision so far and the next call's
// ranking board shows a loss still owed (beside any made up).
// Idempotent: an observation that already has records is left alone.
import { Op, type Sequelize } from "sequelize";
import { epochPrecision, plannedEpochTime } from "~/lib/epochs/progress";
import { AuditEntry, Call, ExecutedEpoch, Instrument, Observation, PlannedEpoch, Proposal, RoleGrant, Telescope, User } from "~/models/index.server";
import { demoCallPlan } from "./20261201000100-demo-observatory";

export const DEMO_OBSERVER = { email: "observer@kestrel-ridge.example", name: "Night desk, Kestrel Ridge", institution: "Kestrel Ridge Observatory" };

/** A fixed pseudo-random number in [0, 1) for an integer (no state, the same on every seeding). */
function jitter(n: number) {
  const x = Math.sin(n * 12.9898) * 43758.5453;
  return x - Math.floor(x);
}

export async function up({ context: sequelize }: { context: Sequelize }) {
  const [observer] = await User.findOrCreate({
    where: { email: DEMO_OBSERVER.email },
    defaults: { email: DEMO_OBSERVER.email, name: DEMO_OBSERVER.name, institution: DEMO_OBSERVER.institution, isMemberInstitution: true, lastSignInAt: null },
  });
  await RoleGrant.findOrCreate({ where: { userId: observer.id, role: "observer" }, defaults: { userId: observer.id, role: "observer", grantedById: null } });

  const running = await Call.findOne({ where: { semesterCode: demoCallPlan(new Date()).running.semesterCode } });
  if (!running) return;
  const proposals = await Proposal.findAll({ where: { callId: running.id, status: "accepted" }, order: [["id", "ASC"]] });
  const observations = await Observation.findAll({
    where: { proposalId: proposals.map((p) => p.id), baselineYears: { [Op.ne]: null } },
    include: [{ model: Instrument, as: "instrument", include: [{ model: Telescope, as: "telescope" }] }],
    order: [["id", "ASC"]],
  });
  await sequelize.transaction(async (transaction) => {
    let k = 0;
    let firstLoss = true;
    for (const o of observations) {
      if (await ExecutedEpoch.findOne({ where: { observationId: o.id }, transaction })) continue;
      const telescope = o.instrument?.telescope;
      if (!telescope || !o.instrument) continue;
      // "missed" too: a run after the executed epochs were wiped (a migrations round trip) finds the same past epochs
      const past = await PlannedEpoch.findAll({ where: { observationId: o.id, status: ["observed", "missed"] }, order: [["date", "ASC"]], transaction });
      for (const [i, epoch] of past.entries()) {
        k += 1;
        const lost = i % 3 === 1;
        // local midnight of the night, moved by up to ±2 h
        const observedAt = new Date(plannedEpochTime(epoch.date, telescope.longitudeDeg) + (jitter(k) - 0.5) * 4 * 3_600_000);
        const fwhm = Math.round((o.seeingArcsec * (0.85 + 0.4 * jitter(k + 100))) * 100) / 100;
        const snr = Math.round((o.snrGoal ?? 100) * (0.7 + 0.5 * jitter(k + 200)));
        const precision = lost ? null : epochPrecision({ fwhmArcsec: fwhm, snr, frames: o.framesPerEpoch, floorMas: o.instrument.astrometricFloorMas });
        const row = await ExecutedEpoch.create(
          {
            observationId: o.id,
            plannedEpochId: epoch.id,
            observedAt,
            telescopeId: telescope.id,
            frames: lost ? 0 : o.framesPerEpoch,
            fwhmArcsec: lost ? null : fwhm,
            snr: lost ? null : snr,
            precisionMas: precision?.precisionMas ?? null,
            precisionSource: precision?.source ?? null,
            lostCause: lost ? (k % 2 === 0 ? "technical" : "weather") : null,
            note: lost ? (k % 2 === 0 ? "invented: camera shutter fault" : "invented: cloud from dusk") : null,
            source: "seed",
            recordedById: observer.id,
          },
          { transaction },
        );
        await epoch.update({ status: lost ? "missed" : "observed", observedAt }, { transaction });
        await AuditEntry.create(
          { actorId: observer.id, action: lost ? "epoch.lost" : "epoch.executed", entityType: "executed_epoch", entityId: row.id, proposalId: o.proposalId as number, details: { seeded: true, observationId: o.id } },
          { transaction },
        );
        // invented: a lost epoch made up three nights later (all but the first loss), and one
        // spare-time epoch three weeks after the first, when those nights are past (unplanned
        // epochs the log takes as well)
        const madeUp = lost && !firstLoss;
        if (lost) firstLoss = false;
        const extra = [...(madeUp ? [{ days: 3, note: "invented: make-up for the lost epoch" }] : []), ...(i === 0 ? [{ days: 21, note: "invented: spare time on a clear night" }] : [])];
        for (const x of extra) {
          const at = new Date(observedAt.getTime() + x.days * 86_400_000);
          if (at.getTime() > Date.now() - 86_400_000) continue;
          k += 1;
          const xf = Math.round((o.seeingArcsec * (0.85 + 0.4 * jitter(k + 100))) * 100) / 100;
          const xs = Math.round((o.snrGoal ?? 100) * (0.7 + 0.5 * jitter(k + 200)));
          const p = epochPrecision({ fwhmArcsec: xf, snr: xs, frames: o.framesPerEpoch, floorMas: o.instrument.astrometricFloorMas });
          const made = await ExecutedEpoch.create(
            { observationId: o.id, plannedEpochId: null, observedAt: at, telescopeId: telescope.id, frames: o.framesPerEpoch, fwhmArcsec: xf, snr: xs, precisionMas: p?.precisionMas ?? null, precisionSource: p?.source ?? null, lostCause: null, note: x.note, source: "seed", recordedById: observer.id },
            { transaction },
          );
          await AuditEntry.create({ actorId: observer.id, action: "epoch.executed", entityType: "executed_epoch", entityId: made.id, proposalId: o.proposalId as number, details: { seeded: true, observationId: o.id } }, { transaction });
        }
      }
    }
  });
}

export async function down() {}
