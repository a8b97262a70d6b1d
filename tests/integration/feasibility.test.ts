// The feasibility sheet through HTTP and the proposal PDF, on the test MariaDB.
import { spawnSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { PDFDocument } from "pdf-lib";
import { beforeAll, describe, expect, it } from "vitest";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { buildProposalPdf } from "~/lib/proposals/pdf.server";
import { Observation, Proposal, Target } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser, sessionCookieFor } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
let pi: Person;
let stranger: Person;
let ready: Awaited<ReturnType<typeof readyProposal>>;

beforeAll(async () => {
  await ensureDatabase();
  pi = await newUser({ name: "Sheet PI" });
  stranger = await newUser({ name: "Sheet Stranger" });
  const call = await testCall();
  ready = await readyProposal({ user: pi.user, callId: call.id, title: "Feasibility test programme" });
});

describe("feasibility sheet screen", () => {
  it("shows the computed sheet to the team", async () => {
    const res = await (await request()).get(`/proposals/${ready.proposal.id}/feasibility`).set("Cookie", pi.cookie);
    expect(res.status).toBe(200);
    expect(res.text).toContain("Feasibility sheet for");
    expect(res.text).toContain("Hollowmere Field 1");
    expect(res.text).toContain("Noise term");
    expect(res.text).toContain("Time per epoch");
  });

  it("answers 404 to other users and sends anonymous visitors to sign in", async () => {
    const other = await (await request()).get(`/proposals/${ready.proposal.id}/feasibility`).set("Cookie", stranger.cookie);
    expect(other.status).toBe(404);
    const anonymous = await (await request()).get(`/proposals/${ready.proposal.id}/feasibility`);
    expect(anonymous.status).toBe(302);
    expect(anonymous.headers.location).toMatch(/^\/sign-in/);
  });

  it("follows the saved observations: an edit shows on the next load", async () => {
    const observation = await Observation.findOne({ where: { proposalId: ready.proposal.id } });
    await observation!.update({ snrGoal: null, exposureSeconds: 3000 });
    await Target.update({ magnitude: 9 }, { where: { id: ready.target.id } });
    const res = await (await request()).get(`/proposals/${ready.proposal.id}/feasibility`).set("Cookie", pi.cookie);
    expect(res.text).toMatch(/saturate/);
    const sheet = await computeFeasibilitySheet({ proposalId: ready.proposal.id });
    expect(sheet.problems.some((p) => p.severity === "blocking" && /saturate/.test(p.message))).toBe(true);
    await observation!.update({ snrGoal: 50, exposureSeconds: null });
    await Target.update({ magnitude: 15.5 }, { where: { id: ready.target.id } });
    expect((await computeFeasibilitySheet({ proposalId: ready.proposal.id })).problems.filter((p) => p.severity === "blocking")).toEqual([]);
  });

  it("stays fast for a proposal with 50 targets", async () => {
    const call = await testCall();
    const big = await readyProposal({ user: pi.user, callId: call.id, title: "Fifty-field survey" });
    const template = (await Observation.findOne({ where: { proposalId: big.proposal.id } }))!;
    const targets = await Target.bulkCreate(
      Array.from({ length: 49 }, (_, i) => ({
        proposalId: big.proposal.id,
        name: `Survey field ${i + 2}`,
        raDeg: 120 + i * 2.5,
        decDeg: -5 + (i % 10) * 6,
        pmRaMasPerYr: null,
        pmDecMasPerYr: null,
        magnitude: 14 + (i % 6),
        band: "V",
        notes: null,
      })),
    );
    await Observation.bulkCreate(
      targets.map((t) => ({
        proposalId: big.proposal.id,
        targetId: t.id,
        instrumentId: template.instrumentId,
        filterId: template.filterId,
        snrGoal: 50,
        exposureSeconds: null,
        framesPerEpoch: 3,
        epochsPerSemester: 1,
        baselineYears: null,
        requiredPmPrecisionMasPerYr: null,
        moonCategory: "dark" as const,
        maxAirmass: 2,
        seeingArcsec: 1.2,
      })),
    );
    const res = await (await request()).get(`/proposals/${big.proposal.id}/feasibility`).set("Cookie", pi.cookie);
    expect(res.status).toBe(200);
    const sheet = await computeFeasibilitySheet({ proposalId: big.proposal.id });
    expect(sheet.observations).toHaveLength(50);
  });
});

describe("feasibility sheet of the 500-field demo survey: summaries in the page, a card's details on request", () => {
  const title = "The Wren Survey: faint halo stars in 500 fields";

  it("renders the table of all observations and only the three open cards", async () => {
    const survey = (await Proposal.findOne({ where: { title } }))!;
    const cookie = await sessionCookieFor("pi@kestrel-ridge.example");
    const res = await (await request()).get(`/proposals/${survey.id}/feasibility`).set("Cookie", cookie);
    expect(res.status).toBe(200);
    const sheet = await computeFeasibilitySheet({ proposalId: survey.id });
    expect(sheet.observations).toHaveLength(500);
    for (const o of [sheet.observations[0], sheet.observations[250], sheet.observations[499]]) expect(res.text).toContain(`href="#obs-${o.observationId}"`);
    expect(res.text.match(/<details /g)).toHaveLength(3);
    // every one of the survey's 500 fields (the demo's definition, SPEC §7) has its row and link
    expect(new Set(res.text.match(/href="#obs-\d+"/g))).toHaveProperty("size", 500);
  });

  it("gives one card in full to the team, 400 without an observation, 404 to others and for another proposal's observation", async () => {
    const survey = (await Proposal.findOne({ where: { title } }))!;
    const cookie = await sessionCookieFor("pi@kestrel-ridge.example");
    const sheet = await computeFeasibilitySheet({ proposalId: survey.id });
    const tenth = sheet.observations[9];
    const api = await request();
    const res = await api.get(`/api/v1/proposals/${survey.id}/feasibility?observationId=${tenth.observationId}`).set("Cookie", cookie);
    expect(res.status).toBe(200);
    expect(res.body.observation).toEqual(tenth);
    expect(res.body.nights).toEqual(sheet.sites[tenth.telescopeId].nights.map((n) => ({ date: n.date, moonCategory: n.moonCategory })));
    expect(res.body.nights).toHaveLength(tenth.visibility.hoursPerNight.length);

    const missing = await api.get(`/api/v1/proposals/${survey.id}/feasibility`).set("Cookie", cookie);
    expect(missing.status).toBe(400);
    expect(missing.body.issues.map((i: { path: string }) => i.path)).toEqual(["observationId"]);
    const notANumber = await api.get(`/api/v1/proposals/${survey.id}/feasibility?observationId=abc`).set("Cookie", cookie);
    expect(notANumber.status).toBe(400);
    const elsewhere = (await Observation.findOne({ where: { proposalId: ready.proposal.id } }))!;
    const foreign = await api.get(`/api/v1/proposals/${survey.id}/feasibility?observationId=${elsewhere.id}`).set("Cookie", cookie);
    expect(foreign.status).toBe(404);
    const stranger = await api.get(`/api/v1/proposals/${survey.id}/feasibility?observationId=${tenth.observationId}`).set("Cookie", pi.cookie);
    expect(stranger.status).toBe(404);
    expect(JSON.stringify(stranger.body)).not.toContain(tenth.targetName);
    const anonymous = await api.get(`/api/v1/proposals/${survey.id}/feasibility?observationId=${tenth.observationId}`);
    expect(anonymous.status).toBe(401);
  });
});

describe("proposal PDF", () => {
  it("has a cover, technical pages and the science case's pages, with the title and state", async () => {
    const proposal = await Proposal.findByPk(ready.proposal.id);
    const bytes = await buildProposalPdf({ proposalId: ready.proposal.id });
    const doc = await PDFDocument.load(bytes);
    expect(doc.getTitle()).toBe(`Draft: ${proposal!.title}`);
    const pages = doc.getPages();
    // The fixture's science case has 2 pages of 595 × 842 pt; ours are A4 (595.28 × 841.89).
    const scienceCase = pages.filter((p) => p.getSize().width === 595 && p.getSize().height === 842);
    expect(scienceCase).toHaveLength(2);
    expect(pages.slice(-2).every((p) => p.getSize().width === 595)).toBe(true);
    expect(pages.length).toBeGreaterThanOrEqual(1 + 1 + 2);
    // The text itself, read back with Debian's poppler-utils (installed by `npm test`'s bootstrap).
    {
      const file = path.join(mkdtempSync(path.join(tmpdir(), "ns-pdf-")), "p.pdf");
      writeFileSync(file, bytes);
      const run = spawnSync("pdftotext", ["-layout", file, "-"], { encoding: "utf8" });
      expect(run.error, "pdftotext (Debian's poppler-utils) must be installed: run `sh app/cli/bootstrap.sh --browser`").toBeUndefined();
      expect(run.status).toBe(0);
      const text = run.stdout;
      expect(text).toContain("Draft — not submitted");
      expect(text).toContain("Feasibility test programme");
      expect(text).toContain("Technical case: feasibility sheet");
      expect(text).toContain("Hollowmere Field 1");
      expect(text).toContain(`page ${pages.length} of ${pages.length}`);
    }
  });
});
