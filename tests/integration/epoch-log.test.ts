// The epoch log through HTTP on the test MariaDB: who may record and read it, the API's refusals
// naming their field, the precision so far checked against an independent five-parameter fit, and
// the night-log CSV import with bad rows.
//
// The independent fit (`independentFit` below) is written here by another route than
// app/lib/astro/astrometry.ts: the Earth's barycentric position straight from astronomy-engine's
// BaryState(Earth) (our module adds an interpolated Sun offset to HelioVector instead), the
// parallax factors written out from the textbook projection of that position across the line of
// sight (Green, Spherical Astronomy, 1985, ch. 11 — from memory; the sign convention does not change
// the variances), times in Julian years from J2000.0 instead of our weighted mean epoch, and the
// normal matrix AᵀWA inverted by ml-matrix 6.15.1 (npm registry; LU decomposition) instead of our
// Gauss–Jordan elimination. σ(μ) and σ(ϖ) are the square roots of its diagonal.
import * as Astro from "astronomy-engine";
import { inverse, Matrix } from "ml-matrix";
import { beforeAll, describe, expect, it } from "vitest";
import { AuditEntry, ExecutedEpoch, Instrument, Observation, PlannedEpoch, Proposal, Target, Telescope } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { epochProgramme, readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
let observer: Person;
let admin: Person;
let pi: Person;
let stranger: Person;
let proposalId: number;
let draftId: number;
let observationId: number;
let otherObservationId: number;
let telescope: Telescope;
let target: Target;
let floorMas: number;
let code: string;

const YEAR_MS = 365.25 * 86_400_000;
const J2000 = Date.UTC(2000, 0, 1, 12);

function independentFit(raDeg: number, decDeg: number, epochs: { at: Date; sigmaMas: number }[]) {
  const a = (raDeg * Math.PI) / 180;
  const d = (decDeg * Math.PI) / 180;
  const rows: number[][] = [];
  const weights: number[] = [];
  for (const e of epochs) {
    const b = Astro.BaryState(Astro.Body.Earth, e.at);
    const fa = b.x * Math.sin(a) - b.y * Math.cos(a);
    const fd = b.x * Math.cos(a) * Math.sin(d) + b.y * Math.sin(a) * Math.sin(d) - b.z * Math.cos(d);
    const tau = (e.at.getTime() - J2000) / YEAR_MS;
    rows.push([1, 0, tau, 0, fa], [0, 1, 0, tau, fd]);
    weights.push(1 / e.sigmaMas ** 2, 1 / e.sigmaMas ** 2);
  }
  const A = new Matrix(rows);
  const W = Matrix.diag(weights);
  const C = inverse(A.transpose().mmul(W).mmul(A));
  return { pmRa: Math.sqrt(C.get(2, 2)), pmDec: Math.sqrt(C.get(3, 3)), parallax: Math.sqrt(C.get(4, 4)) };
}

async function postEpoch(person: Person | null, id: number, body: unknown) {
  const req = (await request()).post(`/api/v1/proposals/${id}/epochs`).set("Content-Type", "application/json");
  if (person) req.set("Cookie", person.cookie);
  return req.send(typeof body === "string" ? body : JSON.stringify(body));
}
async function getEpochs(person: Person | null, id: number, query = "") {
  const req = (await request()).get(`/api/v1/proposals/${id}/epochs${query}`);
  if (person) req.set("Cookie", person.cookie);
  return req;
}

beforeAll(async () => {
  await ensureDatabase();
  observer = await newUser({ roles: ["observer"], name: "Log Observer" });
  admin = await newUser({ roles: ["admin"], name: "Log Office" });
  pi = await newUser({ name: "Log PI" });
  stranger = await newUser({ name: "Log Stranger" });
  const call = await testCall();
  const made = await epochProgramme({ user: pi.user, callId: call.id, title: "Epoch log programme" });
  proposalId = made.proposal.id;
  code = `E01/${call.semesterCode.slice(2)}`;
  await Proposal.update({ status: "accepted", code, serial: 901, submittedAt: new Date() }, { where: { id: proposalId } });
  const obs = await Observation.findOne({ where: { proposalId, baselineYears: 2 } });
  observationId = obs!.id;
  const instrument = (await Instrument.findByPk(obs!.instrumentId))!;
  floorMas = instrument.astrometricFloorMas;
  telescope = (await Telescope.findByPk(instrument.telescopeId))!;
  target = (await Target.findByPk(obs!.targetId))!;
  // remaining planned epochs in the programme's semesters (the re-plan and projection use them)
  await PlannedEpoch.bulkCreate(["2027-03-10", "2027-05-20", "2027-09-15", "2027-12-01"].map((date) => ({ observationId, date, semesterCode: date < "2027-08-01" ? call.semesterCode : "next", status: "planned" as const, observedAt: null })));
  const other = await readyProposal({ user: stranger.user, callId: call.id, title: "Someone else's draft" });
  draftId = other.proposal.id;
  otherObservationId = (await Observation.findOne({ where: { proposalId: draftId } }))!.id;
});

describe("recording epochs: who may, and what is refused", () => {
  it("answers 401 to the anonymous, 403 to the PI and to strangers, and takes the observer's and the admin's", async () => {
    const body = { observedAt: "2025-01-10T03:00Z", telescopeId: telescope.id, frames: 5, precisionMas: 3 };
    expect((await postEpoch(null, proposalId, body)).status).toBe(401);
    const asPi = await postEpoch(pi, proposalId, body);
    expect(asPi.status).toBe(403);
    expect(asPi.body.error).toMatch(/admin or observer/);
    expect((await postEpoch(stranger, proposalId, body)).status).toBe(403);
    expect(await ExecutedEpoch.count({ where: { observationId } })).toBe(0);
  });

  it("refuses bad bodies with 400 naming the field, and saves nothing", async () => {
    const base = { observedAt: "2025-01-10T03:00Z", telescopeId: telescope.id, frames: 5 };
    const cases: [unknown, string][] = [
      [base, "precisionMas"],
      [{ ...base, precisionMas: 3, snr: 100 }, "snr"],
      [{ ...base, snr: 100 }, "fwhmArcsec"],
      [{ ...base, observedAt: "2025-02-30T01:00", precisionMas: 3 }, "observedAt"],
      [{ ...base, observedAt: "yesterday", precisionMas: 3 }, "observedAt"],
      [{ ...base, observedAt: "2099-01-01T00:00Z", precisionMas: 3 }, "observedAt"],
      [{ ...base, frames: -1, precisionMas: 3 }, "frames"],
      [{ ...base, frames: "5; DROP TABLE", precisionMas: 3 }, "frames"],
      [{ ...base, precisionMas: -2 }, "precisionMas"],
      [{ ...base, precisionMas: "NaN" }, "precisionMas"],
      [{ ...base, telescopeId: "1 OR 1=1", precisionMas: 3 }, "telescopeId"],
      [{ ...base, frames: 0, lost: { cause: "aliens" } }, "lost.cause"],
      [{ ...base, precisionMas: 3, extra: 1 }, "extra"],
      ["{not json", "(body)"],
    ];
    for (const [body, path] of cases) {
      const res = await postEpoch(observer, proposalId, body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(res.body.issues.map((i: { path: string }) => i.path), JSON.stringify(body)).toContain(path);
    }
    const wrongObs = await postEpoch(observer, proposalId, { ...base, precisionMas: 3, observationId: otherObservationId });
    expect(wrongObs.status).toBe(400);
    expect(wrongObs.body.issues[0].path).toBe("observationId");
    const noTelescope = await postEpoch(observer, proposalId, { ...base, precisionMas: 3, telescopeId: 4_000_000_000 });
    expect(noTelescope.status).toBe(400);
    expect(noTelescope.body.issues[0].path).toBe("telescopeId");
    const draft = await postEpoch(observer, draftId, { ...base, precisionMas: 3 });
    expect(draft.status).toBe(409);
    expect((await postEpoch(observer, 4_000_000_000, { ...base, precisionMas: 3 })).status).toBe(404);
    expect((await postEpoch(observer, "abc" as unknown as number, { ...base, precisionMas: 3 })).status).toBe(400);
    expect(await ExecutedEpoch.count({ where: { observationId } })).toBe(0);
  });
});

describe("the precision so far", () => {
  // invented epochs over two years: given precisions, one derived from FWHM and SNR, one lost
  const taken = [
    { observedAt: "2025-01-10T03:00:00Z", precisionMas: 3.0 },
    { observedAt: "2025-04-16T22:30:00Z", precisionMas: 2.5 },
    { observedAt: "2025-07-21T01:10:00Z", fwhmArcsec: 1.1, snr: 140 },
    { observedAt: "2025-10-05T23:45:00Z", precisionMas: 4.0 },
    { observedAt: "2026-01-12T02:20:00Z", precisionMas: 2.8 },
  ];

  it("derives an epoch's precision from FWHM and SNR with the centroid formula", async () => {
    // before any epoch: nothing determined
    const empty = (await getEpochs(pi, proposalId)).body;
    expect(empty.reachedSoFar).toEqual({ epochs: 0, determined: false, properMotionPrecisionMasPerYr: null, parallaxPrecisionMas: null });
    const res = await postEpoch(observer, proposalId, { observedAt: taken[2].observedAt, telescopeId: telescope.id, frames: 5, fwhmArcsec: 1.1, snr: 140 });
    expect(res.status).toBe(201);
    // σ = FWHM / (2.3548 · SNR) per frame (SPEC §3.3, FWHM = 2.3548 σ_PSF of a Gaussian), / √frames, floor in quadrature
    const perFrame = (1000 * 1.1) / (2.3548 * 140);
    expect(res.body.precisionMas).toBeCloseTo(Math.hypot(perFrame / Math.sqrt(5), floorMas), 6);
    expect(res.body.precisionSource).toBe("derived");
  });

  it("matches an independent five-parameter least-squares fit as epochs are added (astronomy-engine BaryState + ml-matrix)", async () => {
    for (const e of taken.filter((_, i) => i !== 2)) {
      const res = await postEpoch(admin, proposalId, { observedAt: e.observedAt, telescopeId: telescope.id, frames: 5, ...(e.precisionMas ? { precisionMas: e.precisionMas } : {}) });
      expect(res.status).toBe(201);
    }
    // a lost epoch: in the log, not in the fit
    const lost = await postEpoch(observer, proposalId, { observedAt: "2025-12-01T01:00Z", telescopeId: telescope.id, frames: 0, lost: { cause: "weather" } });
    expect(lost.status).toBe(201);
    expect(lost.body.precisionMas).toBeNull();

    const res = await getEpochs(pi, proposalId);
    expect(res.status).toBe(200);
    expect(res.body.executed).toHaveLength(6);
    expect(res.body.executed.filter((e: { lost?: unknown }) => e.lost)).toEqual([expect.objectContaining({ lost: { cause: "weather" }, targetId: target.id, telescopeId: telescope.id })]);
    const derived = res.body.executed.find((e: { observedAt: string }) => e.observedAt.startsWith("2025-07-21"));
    const fitEpochs = res.body.executed
      .filter((e: { lost?: unknown }) => !e.lost)
      .map((e: { observedAt: string; precisionMas: number }) => ({ at: new Date(e.observedAt), sigmaMas: e.precisionMas }));
    expect(fitEpochs).toHaveLength(5);
    const ref = independentFit(target.raDeg, target.decDeg, fitEpochs);
    const reached = res.body.reachedSoFar;
    expect(reached.properMotionPrecisionMasPerYr.ra).toBeCloseTo(ref.pmRa, 3);
    expect(reached.properMotionPrecisionMasPerYr.dec).toBeCloseTo(ref.pmDec, 3);
    expect(reached.parallaxPrecisionMas).toBeCloseTo(ref.parallax, 3);
    expect(derived.precisionSource).toBe("derived");

    // projected: the remaining planned epochs at the sheet's per-epoch precision, at local midnight of their nights
    const obs = res.body.observations[0];
    const planned = res.body.planned.map((p: { date: string }) => ({ at: new Date(Date.parse(`${p.date}T00:00:00Z`) + 86_400_000 - (telescope.longitudeDeg / 360) * 86_400_000), sigmaMas: obs.perEpochPrecisionMas }));
    expect(planned).toHaveLength(4);
    const projected = independentFit(target.raDeg, target.decDeg, [...fitEpochs, ...planned]);
    expect(res.body.projected.properMotionPrecisionMasPerYr.ra).toBeCloseTo(projected.pmRa, 2);
    expect(res.body.projected.parallaxPrecisionMas).toBeCloseTo(projected.parallax, 2);
    expect(res.body.required).toEqual({ properMotionPrecisionMasPerYr: 1.5 });

  });

  it("is read by the team and the office, not by others", async () => {
    expect((await getEpochs(null, proposalId)).status).toBe(401);
    expect((await getEpochs(stranger, proposalId)).status).toBe(404);
    expect((await getEpochs(observer, proposalId)).status).toBe(200);
    // observers read accepted programmes; the office reads any
    expect((await getEpochs(observer, draftId)).status).toBe(404);
    expect((await getEpochs(admin, draftId)).status).toBe(200);
    expect((await getEpochs(pi, proposalId, "?observationId=abc")).status).toBe(400);
    const wrong = await getEpochs(pi, proposalId, `?observationId=${otherObservationId}`);
    expect(wrong.status).toBe(400);
    expect(wrong.body.issues[0].path).toBe("observationId");
  });

  it("refuses the same epoch twice and audits each record", async () => {
    const again = await postEpoch(observer, proposalId, { observedAt: "2025-01-10T03:00:30Z", telescopeId: telescope.id, frames: 5, precisionMas: 3 });
    expect(again.status).toBe(409);
    expect(again.body.issues[0].path).toBe("observedAt");
    expect(await AuditEntry.count({ where: { proposalId, action: "epoch.executed" } })).toBe(5);
    expect(await AuditEntry.count({ where: { proposalId, action: "epoch.lost" } })).toBe(1);
  });
});

describe("the night-log CSV import", () => {
  it("records the good rows and reports every bad one with its reason", async () => {
    const before = await ExecutedEpoch.count({ where: { observationId } });
    const csv = [
      "proposal,target,observed_at,telescope,frames,fwhm,snr,precision_mas,lost,note",
      `${code},,2026-02-14T02:00,${telescope.name},5,,,2.2,,good`,
      `${code},${target.name},2026-03-20T01:30Z,${telescope.name},5,1.2,150,,,derived`,
      `${code},,2026-04-02T00:10,${telescope.name},0,,,,weather,cloud`,
      `999/99Z,,2026-04-03T00:10,${telescope.name},5,,,2,,`,
      `${code},,2026-04-04T00:10,No such scope,5,,,2,,`,
      `${code},,2026-04-31T00:10,${telescope.name},5,,,2,,`,
      `${code},,2026-04-05T00:10,${telescope.name},5,,,,,no precision`,
      `${code},,2026-02-14T02:00,${telescope.name},5,,,2.2,,twin of line 2`,
      `${code},,2026-04-06T00:10,${telescope.name},0,,,,aliens,`,
      `${code},Nowhere,2026-04-07T00:10,${telescope.name},5,,,2,,`,
      `${code},,2026-04-08T00:10,${telescope.name},5,,,2,,,extra`,
      `${code},,2026-04-09T00:10,${telescope.name},5,,140,,,snr without fwhm`,
      `${code},,2026-04-10T00:10,${telescope.name},5,0.9,140,2,,both`,
      `${code},,2026-04-11T00:10,${telescope.name},5,wide,,2,,bad fwhm`,
    ].join("\n");
    const res = await (await request()).post("/admin/epochs").set("Cookie", observer.cookie).type("form").send(new URLSearchParams({ intent: "night-log", csv }).toString());
    expect(res.status).toBe(200);
    expect(await ExecutedEpoch.count({ where: { observationId } })).toBe(before + 3);
    const text = res.text.replaceAll("<!-- -->", "");
    expect(text).toContain("3 recorded");
    expect(text).toContain("11 refused");
    expect(text).toContain("999/99Z&quot; is not an accepted astrometry programme");
    expect(text).toContain("No such scope&quot; is not a telescope");
    expect(text).toMatch(/observed_at must be a date and UTC time/);
    expect(text).toMatch(/precision_mas is required for an executed epoch/);
    expect(text).toContain("is already on line 2");
    expect(text).toContain("lost must be weather or technical");
    expect(text).toContain("Nowhere&quot; is not an astrometric target");
    expect(text).toContain("11 cells but the header has 10 columns");
    // each refusal names the column the office wrote, not the API's field behind it
    const table = text.match(/<table[^>]*aria-label="Night log report"[\s\S]*?<\/table>/)?.[0] ?? "";
    expect(table).toContain("fwhm is required to derive the precision from the SNR");
    expect(table).toContain("Give precision_mas or snr, not both");
    expect(table).toContain("fwhm must be a number above 0 and at most 20");
    expect(table).toContain("unless snr and fwhm are given");
    expect(table).not.toMatch(/fwhmArcsec|precisionMas|observedAt|telescopeId|lost\.cause/);
    const box = text.match(/<textarea[^>]*id="night-log"[^>]*>([\s\S]*?)<\/textarea>/)?.[1] ?? "";
    expect(box).toContain("No such scope");
    expect(box).not.toContain(",good");
    const derived = await ExecutedEpoch.findOne({ where: { observationId, note: "derived" } });
    expect(derived!.precisionSource).toBe("derived");
    expect(derived!.precisionMas).toBeCloseTo(Math.hypot((1000 * 1.2) / (2.3548 * 150) / Math.sqrt(5), floorMas), 6);
  });

  it("explains a bad header, and is for the office and observers only", async () => {
    const header = await (await request()).post("/admin/epochs").set("Cookie", admin.cookie).type("form").send(new URLSearchParams({ intent: "night-log", csv: "when,where\n1,2" }).toString());
    expect(header.status).toBe(400);
    expect(header.text).toContain("missing columns proposal, observed_at, telescope, frames");
    const asPi = await (await request()).post("/admin/epochs").set("Cookie", pi.cookie).type("form").send(new URLSearchParams({ intent: "night-log", csv: "x" }).toString());
    expect(asPi.status).toBe(403);
  });
});

describe("the re-plan", () => {
  it("offers the remaining epochs again and the PI's acceptance replaces them, audited", async () => {
    const page = await (await request()).get(`/proposals/${proposalId}/epochs`).set("Cookie", pi.cookie);
    expect(page.status).toBe(200);
    const progress = (await getEpochs(pi, proposalId, "?replan=1")).body;
    const replan = progress.observations[0].replan;
    expect(replan.dates.length).toBeGreaterThan(0);
    const dates = replan.dates.map((d: { date: string }) => d.date).join(",");
    const stale = await (await request()).post(`/proposals/${proposalId}/epochs`).set("Cookie", pi.cookie).type("form").send(new URLSearchParams({ intent: "accept-replan", observationId: String(observationId), dates: "2027-01-01" }).toString());
    expect(stale.status).toBe(409);
    const ok = await (await request()).post(`/proposals/${proposalId}/epochs`).set("Cookie", pi.cookie).type("form").send(new URLSearchParams({ intent: "accept-replan", observationId: String(observationId), dates }).toString());
    expect(ok.status).toBe(200);
    const now = await PlannedEpoch.findAll({ where: { observationId, status: "planned" }, order: [["date", "ASC"]] });
    expect(now.map((e) => e.date).join(",")).toBe(dates);
    const audit = await AuditEntry.findOne({ where: { proposalId, action: "epochs.replanned" } });
    expect((audit!.details as { after: string[] }).after.join(",")).toBe(dates);
  });
});

describe("what earlier programmes still owe, on the next call's ranking board", () => {
  it("lists the demo's accepted multi-semester programmes with lost epochs not made up, and their hours", async () => {
    const { demoCallPlan } = await import("../../sequelize/seeders/20261201000100-demo-observatory");
    const { Call } = await import("~/models/index.server");
    const { owedBeforeCall } = await import("~/lib/epochs/epochs.server");
    const { computeFeasibilitySheet } = await import("~/lib/proposals/feasibility.server");
    const review = (await Call.findOne({ where: { semesterCode: demoCallPlan().review.semesterCode } }))!;
    const owed = await owedBeforeCall({ callId: review.id });
    // the demo seeder loses the second of every three past epochs of the running call's accepted astrometry programmes
    const running = (await Call.findOne({ where: { semesterCode: demoCallPlan().running.semesterCode } }))!;
    const demo = await Proposal.findAll({ where: { callId: running.id, status: "accepted", isMultiSemester: true }, order: [["id", "ASC"]] });
    // the seeder makes up every loss but the first three nights later (its note says so)
    const tally: { p: Proposal; lost: number; madeUp: number }[] = [];
    for (const p of demo) {
      const obsIds = (await Observation.findAll({ where: { proposalId: p.id } })).map((o) => o.id);
      const lost = await ExecutedEpoch.count({ where: { observationId: obsIds, lostCause: ["weather", "technical"] } });
      const madeUp = await ExecutedEpoch.count({ where: { observationId: obsIds, lostCause: null, plannedEpochId: null, note: "invented: make-up for the lost epoch" } });
      if (lost > 0) tally.push({ p, lost, madeUp });
    }
    const owing = tally.filter((t) => t.lost > t.madeUp);
    expect(owing.length).toBeGreaterThan(0);
    // a programme whose losses are all made up is listed only for epochs past due, not logged
    for (const t of tally.filter((x) => x.madeUp === x.lost)) {
      const repaid = owed.find((o) => o.proposalId === t.p.id);
      expect(repaid === undefined || (repaid.madeUpEpochs === t.lost && repaid.overdueEpochs > 0), String(t.p.code)).toBe(true);
    }
    const { p: owes, lost, madeUp } = owing[0];
    const row = owed.find((o) => o.proposalId === owes.id)!;
    expect(row).toMatchObject({ lostEpochs: lost, madeUpEpochs: madeUp });
    const sheet = await computeFeasibilitySheet({ proposalId: owes.id });
    const hoursPerEpoch = sheet.observations.find((o) => o.astrometry)!.timePerEpoch.totalSeconds! / 3600;
    expect(row.hoursOwed).toBeCloseTo((lost - madeUp + row.overdueEpochs) * hoursPerEpoch, 2);
    const chair = await import("../helpers/session").then((m) => m.sessionCookieFor("chair@kestrel-ridge.example"));
    const page = await (await request()).get(`/committee/${review.id}/board`).set("Cookie", chair);
    expect(page.status).toBe(200);
    expect(page.text).toContain("Still owed to earlier multi-semester programmes");
    expect(page.text).toContain(`data-testid="owed-${owes.id}"`);
  });
});

describe("a lost epoch made up", () => {
  it("is no longer owed, nor its hours, once its make-up is executed; a loss not made up still is", async () => {
    const { owedBeforeCall } = await import("~/lib/epochs/epochs.server");
    const { computeFeasibilitySheet } = await import("~/lib/proposals/feasibility.server");
    const earlier = await testCall();
    const made = await epochProgramme({ user: pi.user, callId: earlier.id, title: "Made-up epochs programme" });
    const id = made.proposal.id;
    await Proposal.update({ status: "accepted", code: `E02/${earlier.semesterCode.slice(2)}`, serial: 902, submittedAt: new Date(), isMultiSemester: true }, { where: { id } });
    const obs = (await Observation.findOne({ where: { proposalId: id, baselineYears: 2 } }))!;
    await PlannedEpoch.bulkCreate(["2026-01-10", "2026-02-10", "2026-03-10"].map((date) => ({ observationId: obs.id, date, semesterCode: earlier.semesterCode, status: "planned" as const, observedAt: null })));
    const later = await testCall();
    await later.update({ semesterStart: "2027-08-01", semesterEnd: "2028-01-31" });
    const sheet = await computeFeasibilitySheet({ proposalId: id });
    const h = sheet.observations.find((o) => o.observationId === obs.id)!.timePerEpoch.totalSeconds! / 3600;
    expect(h).toBeGreaterThan(0);
    const at = (observedAt: string, extra: object) => postEpoch(observer, id, { observedAt, telescopeId: telescope.id, ...extra });
    const owedRow = async () => (await owedBeforeCall({ callId: later.id })).find((o) => o.proposalId === id);

    expect((await at("2026-01-10T23:30Z", { frames: 5, precisionMas: 3 })).status).toBe(201);
    expect((await at("2026-02-10T23:30Z", { frames: 0, lost: { cause: "weather" } })).status).toBe(201);
    expect((await at("2026-03-10T23:30Z", { frames: 0, lost: { cause: "technical" } })).status).toBe(201);
    const before = await owedRow();
    expect(before).toMatchObject({ lostEpochs: 2, overdueEpochs: 0, executedEpochs: 1 });
    expect(before!.hoursOwed).toBeCloseTo(2 * h, 2);

    // the February loss made up on an unplanned night four nights later
    expect((await at("2026-02-14T23:30Z", { frames: 5, precisionMas: 3, note: "make-up" })).status).toBe(201);
    const after = await owedRow();
    expect(after).toMatchObject({ lostEpochs: 2, madeUpEpochs: 1, overdueEpochs: 0, executedEpochs: 2 });
    expect(after!.hoursOwed).toBeCloseTo(1 * h, 2);

    // the March loss made up too: nothing owed, the programme leaves the board's list
    expect((await at("2026-03-20T23:30Z", { frames: 5, precisionMas: 3, note: "make-up" })).status).toBe(201);
    expect(await owedRow()).toBeUndefined();
    const chair = await import("../helpers/session").then((m) => m.newUser({ roles: ["chair"], name: "Owed Chair" }));
    const page = await (await request()).get(`/committee/${later.id}/board`).set("Cookie", chair.cookie);
    expect(page.status).toBe(200);
    expect(page.text).toContain("Still owed to earlier multi-semester programmes");
    expect(page.text).not.toContain(`data-testid="owed-${id}"`);
  });
});
