// Loads what the feasibility sheet needs from the database and hands it to the pure computation
// in ./feasibility.ts. Callers check access first (getProposalForUser); this module only reads.
import { createHash } from "node:crypto";
import { altitudeCurve } from "~/lib/astro/visibility";
import { buildFeasibilitySheet, type FeasibilityInput, type FeasibilitySheet } from "~/lib/proposals/feasibility";
import { Call, CallOffer, Filter, Instrument, Observation, PlannedEpoch, Proposal, Target, Telescope } from "~/models/index.server";
import { sheetTarget } from "~/models/Target";
import { observationSettings } from "~/models/Observation";
import { Lru } from "../lru";
import { officeSemesters, semesterSpan } from "../office/semesters.server";
import { plainFilter } from "../office/filters.server";
import { plainInstrument } from "../office/instruments.server";

export type { FeasibilitySheet } from "~/lib/proposals/feasibility";

export class FeasibilityNotFound extends Error {}

function byProposal<T extends { proposalId?: unknown }>(rows: T[]): Map<number, T[]> {
  const out = new Map<number, T[]>();
  for (const row of rows) {
    const id = row.proposalId as number;
    const list = out.get(id);
    if (list) list.push(row);
    else out.set(id, [row]);
  }
  return out;
}

/** What the inputs need of a proposal (a model, or a plain row the caller has just read). */
export type FeasibilityProposal = { id: number; callId?: unknown; isMultiSemester: boolean | number; semestersRequested: string[] | string | null };

/**
 * The feasibility inputs of many proposals in at most six queries, whatever their number (the
 * ranking board reads hundreds): the proposals (unless given), every call with its offers (or,
 * when the caller gives the calls, only the office's semesters), the targets, the observations,
 * the telescopes with instruments and filters (one statement), and the observations' planned
 * epochs (when there are observations).
 */
export async function loadFeasibilityInputs(args: { proposalIds: number[]; proposals?: FeasibilityProposal[]; calls?: Call[] }): Promise<Map<number, FeasibilityInput>> {
  return (await readFeasibilityInputs(args)).inputs;
}

/**
 * The inputs and the target and observation rows they were made from (for callers that show them
 * too): plain rows typed as models (`raw: true`: MariaDB's TINYINT and JSON text unconverted).
 */
async function readFeasibilityInputs({ proposalIds, proposals: given, calls: givenCalls }: { proposalIds: number[]; proposals?: FeasibilityProposal[]; calls?: Call[] }) {
  const out = new Map<number, FeasibilityInput>();
  const ids = [...new Set(proposalIds)];
  const empty = { inputs: out, targets: [] as Target[], observations: [] as Observation[] };
  if (ids.length === 0) return empty;
  // a caller that has just read the proposals passes them
  const wanted = new Set(ids);
  const proposals: FeasibilityProposal[] = given ? given.filter((p) => wanted.has(p.id)) : await Proposal.findAll({ where: { id: ids } });
  if (proposals.length === 0) return empty;
  const callIds = [...new Set(proposals.map((p) => p.callId as number))];
  // a caller that has the calls with their offers passes them; otherwise every call is read with
  // its offers in one statement (a few per semester), for the proposals' calls and the later semesters
  const haveCalls = givenCalls && callIds.every((id) => givenCalls.some((c) => c.id === id));
  const [callRows, targets, observations, telescopes, semesters] = await Promise.all([
    haveCalls ? givenCalls : Call.findAll({ include: [{ model: CallOffer, as: "offers" }], order: [["semesterStart", "ASC"], ["id", "ASC"]] }),
    // plain rows: hundreds of proposals' targets and observations need no model instances
    Target.findAll({ where: { proposalId: ids }, order: [["id", "ASC"]], raw: true }),
    Observation.findAll({ where: { proposalId: ids }, order: [["id", "ASC"]], raw: true }),
    Telescope.findAll({ include: [{ model: Instrument, as: "instruments", include: [{ model: Filter, as: "filters" }] }], order: [["id", "ASC"], [{ model: Instrument, as: "instruments" }, "id", "ASC"], [{ model: Instrument, as: "instruments" }, { model: Filter, as: "filters" }, "id", "ASC"]] }),
    haveCalls ? officeSemesters() : null,
  ]).then(([callRows, targets, observations, telescopes, semesters]) => [callRows, targets, observations, telescopes, semesters ?? callRows.map(semesterSpan)] as const);
  const epochs = observations.length
    ? await PlannedEpoch.findAll({ where: { observationId: observations.map((o) => o.id) }, order: [["id", "ASC"]] })
    : [];
  const epochsOf = new Map<number, PlannedEpoch[]>();
  for (const e of epochs) {
    const list = epochsOf.get(e.observationId as number);
    if (list) list.push(e);
    else epochsOf.set(e.observationId as number, [e]);
  }
  const callOf = new Map(callRows.map((c) => [c.id, c]));
  const instruments = telescopes.flatMap((t) => t.instruments ?? []);
  const shared = {
    telescopes: telescopes.map((t) => ({
      id: t.id,
      name: t.name,
      site: { latitudeDeg: t.latitudeDeg, longitudeDeg: t.longitudeDeg, elevationM: t.elevationM, timeZone: t.timeZone },
      apertureM: t.apertureM,
      centralObstruction: t.centralObstruction,
    })),
    instruments: instruments.map(plainInstrument),
    filters: instruments.flatMap((i) =>
      (i.filters ?? []).map((f) => ({ ...plainFilter(f), instrumentId: f.instrumentId })),
    ),
  };
  const targetsOf = byProposal(targets);
  const observationsOf = byProposal(observations);
  for (const proposal of proposals) {
    const call = callOf.get(proposal.callId as number);
    if (!call) continue;
    out.set(proposal.id, {
      proposalId: proposal.id,
      call: {
        semesterCode: call.semesterCode,
        semesterStart: call.semesterStart,
        semesterEnd: call.semesterEnd,
        offers: (call.offers ?? []).map((o) => ({ telescopeId: o.telescopeId, moonCategory: o.moonCategory, hoursOffered: o.hoursOffered })),
        // the office's own dates for later semesters (the epoch planner's semesters)
        laterSemesters: semesters.filter((s) => s.start > call.semesterEnd),
      },
      // plain rows bring MariaDB's TINYINT and JSON text
      isMultiSemester: Boolean(proposal.isMultiSemester),
      semestersRequested: (typeof proposal.semestersRequested === "string" ? (JSON.parse(proposal.semestersRequested) as string[]) : proposal.semestersRequested) ?? [call.semesterCode],
      ...shared,
      targets: (targetsOf.get(proposal.id) ?? []).map(sheetTarget),
      observations: (observationsOf.get(proposal.id) ?? []).map((o) => ({
        ...observationSettings(o),
        epochs: (epochsOf.get(o.id) ?? []).map((e) => ({ id: e.id, date: e.date, semesterCode: e.semesterCode, status: e.status })),
      })),
    });
  }
  return { inputs: out, targets, observations };
}

/**
 * One proposal's input with the plain rows of its targets and observations (the proposal API
 * shows them too, and reads them once). `proposal` is the row the caller's access check read.
 */
export async function loadFeasibilityInputWithRows({ proposal }: { proposal: FeasibilityProposal }) {
  const { inputs, targets, observations } = await readFeasibilityInputs({ proposalIds: [proposal.id], proposals: [proposal] });
  const input = inputs.get(proposal.id);
  if (!input) throw new FeasibilityNotFound(`No proposal ${proposal.id} (or no call for it)`);
  return { input, targets, observations };
}

export async function loadFeasibilityInput({ proposalId }: { proposalId: number }): Promise<FeasibilityInput> {
  const input = (await loadFeasibilityInputs({ proposalIds: [proposalId] })).get(proposalId);
  if (!input) throw new FeasibilityNotFound(`No proposal ${proposalId} (or no call for it)`);
  return input;
}

/**
 * One sheet per state of its inputs: the sheet page, the checklist, the API, the PDF and the
 * ranking board ask for the same sheet many times. Keyed by a hash of the whole input (what the
 * proposal holds, the call's offers and the office's telescopes), so any change is a new key and
 * nothing needs to be invalidated. Callers must not change a sheet they are given.
 */
const sheetCache = new Lru<string, FeasibilitySheet>(400);

/**
 * The office's part of an input (telescopes, instruments, filters) is one object shared by every
 * input of a batch: it is hashed once per batch, and each proposal adds only its own part.
 */
const officeKeys = new WeakMap<object, string>();
function inputKey(input: FeasibilityInput): string {
  const { telescopes, instruments, filters, ...own } = input;
  let office = officeKeys.get(telescopes);
  if (office === undefined || (officeKeys.get(instruments) !== office) || (officeKeys.get(filters) !== office)) {
    office = createHash("sha1").update(JSON.stringify([telescopes, instruments, filters])).digest("base64");
    officeKeys.set(telescopes, office).set(instruments, office).set(filters, office);
  }
  return createHash("sha1").update(office).update(JSON.stringify(own)).digest("base64");
}

export function feasibilitySheetOf(input: FeasibilityInput): FeasibilitySheet {
  const key = inputKey(input);
  const hit = sheetCache.get(key);
  if (hit) return hit;
  const sheet = buildFeasibilitySheet(input);
  sheetCache.set(key, sheet);
  return sheet;
}

/** The proposal's feasibility sheet. Access must have been checked by the caller. */
export async function computeFeasibilitySheet({ proposalId }: { proposalId: number }): Promise<FeasibilitySheet> {
  return feasibilitySheetOf(await loadFeasibilityInput({ proposalId }));
}

/** Sheets of many proposals (the ranking board); a sheet that fails to compute is its Error. */
export async function computeFeasibilitySheets({ proposalIds, proposals, calls }: { proposalIds: number[]; proposals?: FeasibilityProposal[]; calls?: Call[] }): Promise<Map<number, FeasibilitySheet | Error>> {
  const inputs = await loadFeasibilityInputs({ proposalIds, proposals, calls });
  const out = new Map<number, FeasibilitySheet | Error>();
  for (const id of proposalIds) {
    const input = inputs.get(id);
    if (!input) {
      out.set(id, new FeasibilityNotFound(`No proposal ${id} (or no call for it)`));
      continue;
    }
    try {
      out.set(id, feasibilitySheetOf(input));
    } catch (error) {
      out.set(id, error instanceof Error ? error : new Error(String(error)));
    }
  }
  return out;
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
