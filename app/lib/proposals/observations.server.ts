// Observations of a proposal: per target, an instrument and filter from the call's telescopes.
import { byBand } from "~/lib/astro/bands";
import { Refusal } from "~/lib/forms";
import { writeAudit } from "~/lib/audit.server";
import type { FeasibilityInput } from "~/lib/proposals/feasibility";
import type { ObservationInput } from "~/lib/schemas/proposals";
import { CallOffer, Filter, Instrument, Observation, sequelize, Target, Telescope } from "~/models/index.server";
import { observationSettings } from "~/models/Observation";
import { assertEditable, getProposalForUser, type Actor } from "./proposals.server";
import type { Transaction } from "sequelize";

export type InstrumentOption = {
  telescopeId: number;
  telescopeName: string;
  apertureM: number;
  instrumentId: number;
  instrumentName: string;
  readoutSeconds: number;
  acquisitionSeconds: number;
  filters: { id: number; band: string }[];
};

/** Instruments (with their filters) on the telescopes that this call offers time on. */
export async function instrumentOptions({ callId, transaction }: { callId: number; transaction?: Transaction }): Promise<InstrumentOption[]> {
  const offers = await CallOffer.findAll({ where: { callId }, attributes: ["telescopeId"], transaction });
  const telescopeIds = [...new Set(offers.map((o) => o.telescopeId))];
  if (telescopeIds.length === 0) return [];
  const telescopes = await Telescope.findAll({
    where: { id: telescopeIds },
    include: [{ model: Instrument, as: "instruments", include: [{ model: Filter, as: "filters" }] }],
    order: [["apertureM", "DESC"], ["id", "ASC"]],
    transaction,
  });
  return telescopes.flatMap((t) =>
    (t.instruments ?? []).map((i) => ({
      telescopeId: t.id,
      telescopeName: t.name,
      apertureM: t.apertureM,
      instrumentId: i.id,
      instrumentName: i.name,
      readoutSeconds: i.readoutSeconds,
      acquisitionSeconds: i.acquisitionSeconds,
      filters: (i.filters ?? [])
        .map((f) => ({ id: f.id, band: f.band }))
        .sort((a, b) => byBand(a.band, b.band) || a.band.localeCompare(b.band)),
    })),
  );
}

export type ObservationRow = Omit<ObservationInput, "mode"> & { id: number; mode: "snr" | "exposure"; targetName: string; instrumentName: string; telescopeId: number; band: string };

export async function listObservations({ user, proposalId }: { user: Actor; proposalId: number }) {
  return observationRows({ access: await getProposalForUser({ proposalId, user }) });
}

/** The observations and instrument options of a proposal whose access the caller has already checked. */
export async function observationRows({ access }: { access: Awaited<ReturnType<typeof getProposalForUser>> }) {
  const proposalId = access.proposal.id;
  const [observations, options] = await Promise.all([
    Observation.findAll({
      where: { proposalId },
      include: [
        { model: Target, as: "target" },
        { model: Instrument, as: "instrument" },
        { model: Filter, as: "filter" },
      ],
      order: [["targetId", "ASC"], ["id", "ASC"]],
    }),
    instrumentOptions({ callId: access.call.id }),
  ]);
  const rows = observations.map((o) =>
    observationRow(o, { targetName: o.target?.name, instrumentName: o.instrument?.name, telescopeId: o.instrument?.telescopeId, band: o.filter?.band }),
  );
  return { access, observations: rows, options };
}

/**
 * The same rows from plain observation rows and the feasibility input read with them (its
 * targets, instruments and filters), without reading anything again.
 */
export function observationRowsOf(observations: Observation[], input: Pick<FeasibilityInput, "targets" | "instruments" | "filters">): ObservationRow[] {
  const targetOf = new Map(input.targets.map((t) => [t.id, t]));
  const instrumentOf = new Map(input.instruments.map((i) => [i.id, i]));
  const filterOf = new Map(input.filters.map((f) => [f.id, f]));
  return [...observations]
    .sort((a, b) => a.targetId - b.targetId || a.id - b.id)
    .map((o) =>
      observationRow(o, {
        targetName: targetOf.get(o.targetId)?.name,
        instrumentName: instrumentOf.get(o.instrumentId)?.name,
        telescopeId: instrumentOf.get(o.instrumentId)?.telescopeId,
        band: filterOf.get(o.filterId)?.band,
      }),
    );
}

/** One row of the observations tab: the observation's settings and the names it points at. */
function observationRow(o: Observation, names: { targetName?: string; instrumentName?: string; telescopeId?: number | null; band?: string }): ObservationRow {
  return {
    ...observationSettings(o),
    targetName: names.targetName ?? "?",
    instrumentName: names.instrumentName ?? "?",
    telescopeId: names.telescopeId ?? 0,
    band: names.band ?? "?",
    mode: o.snrGoal !== null ? "snr" : "exposure",
  };
}

async function checkChoices(proposalId: number, callId: number, input: ObservationInput, transaction: Transaction) {
  const target = await Target.findOne({ where: { id: input.targetId, proposalId }, transaction });
  if (!target) throw new Refusal("Choose one of this proposal's targets.", { status: 400, field: "targetId" });
  const options = await instrumentOptions({ callId, transaction });
  const instrument = options.find((o) => o.instrumentId === input.instrumentId);
  if (!instrument) throw new Refusal("Choose an instrument on a telescope that this call offers.", { status: 400, field: "instrumentId" });
  if (!instrument.filters.some((f) => f.id === input.filterId)) throw new Refusal(`Choose one of the filters of ${instrument.instrumentName}.`, { status: 400, field: "filterId" });
  return { target, instrument };
}

function columns(input: ObservationInput) {
  const { mode: _mode, ...rest } = input;
  return rest;
}

export async function createObservation({ user, proposalId, input }: { user: Actor; proposalId: number; input: ObservationInput }) {
  return sequelize.transaction(async (transaction) => {
    const access = await getProposalForUser({ proposalId, user, transaction, lock: true });
    assertEditable(access);
    const { target, instrument } = await checkChoices(proposalId, access.call.id, input, transaction);
    const observation = await Observation.create({ proposalId, ...columns(input) }, { transaction });
    await writeAudit(
      { actorId: user.id, action: "observation.added", entityType: "observation", entityId: observation.id, proposalId, details: { target: target.name, instrument: instrument.instrumentName } },
      transaction,
    );
    return observation;
  });
}

export async function updateObservation({ user, proposalId, observationId, input }: { user: Actor; proposalId: number; observationId: number; input: ObservationInput }) {
  return sequelize.transaction(async (transaction) => {
    const access = await getProposalForUser({ proposalId, user, transaction, lock: true });
    assertEditable(access);
    const observation = await Observation.findOne({ where: { id: observationId, proposalId }, transaction });
    if (!observation) throw new Refusal("That observation is not part of this proposal (any more).", { status: 400, field: "form" });
    const { target } = await checkChoices(proposalId, access.call.id, input, transaction);
    await observation.update(columns(input), { transaction });
    await writeAudit({ actorId: user.id, action: "observation.updated", entityType: "observation", entityId: observationId, proposalId, details: { target: target.name } }, transaction);
    return observation;
  });
}

export async function deleteObservation({ user, proposalId, observationId }: { user: Actor; proposalId: number; observationId: number }) {
  return sequelize.transaction(async (transaction) => {
    assertEditable(await getProposalForUser({ proposalId, user, transaction, lock: true }));
    const observation = await Observation.findOne({ where: { id: observationId, proposalId }, include: [{ model: Target, as: "target" }], transaction });
    if (!observation) throw new Refusal("That observation is not part of this proposal (any more).", { status: 400, field: "form" });
    await observation.destroy({ transaction });
    await writeAudit({ actorId: user.id, action: "observation.deleted", entityType: "observation", entityId: observationId, proposalId, details: { target: observation.target?.name ?? null } }, transaction);
  });
}
