// RA pressure through HTTP on the test MariaDB. Check values come from other paths than the RA
// pressure code: the semester's dark hours from each feasibility sheet's own nights, the requested
// hours from the ranking board's oversubscription (sheet totals), the clear fractions from the rows
// written here, and the access rules. Targets are invented (tests/integration/demo-sky.test.ts).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createObservation } from "~/lib/proposals/observations.server";
import { createTarget } from "~/lib/proposals/targets.server";
import { observationSchema, targetSchema } from "~/lib/schemas/proposals";
import { computeFeasibilitySheet } from "~/lib/proposals/feasibility.server";
import { CallOffer, Proposal, Telescope, TelescopeClearFraction } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";
import { readyProposal, testCall } from "./proposals-fixtures";

type Person = Awaited<ReturnType<typeof newUser>>;
type Bin = { raHour: number; darkHours: number; availableDarkHours: number; requestedHours: number; byMoonCategory: Record<string, { darkHours: number; availableDarkHours: number; requestedHours: number }> };
let chair: Person, reviewer: Person;
let call: Awaited<ReturnType<typeof testCall>>;
let narrowCall: Awaited<ReturnType<typeof testCall>>;
let telescopeId: number, otherTelescopeId: number;
let proposalIds: number[];
let savedFractions: { telescopeId: number; month: number; clearFraction: number }[];
const sum = (xs: number[]) => xs.reduce((s, x) => s + x, 0);

beforeAll(async () => {
  await ensureDatabase();
  chair = await newUser({ roles: ["chair"], name: "RA Chair" });
  reviewer = await newUser({ roles: ["reviewer"], name: "RA Reviewer" });
  call = await testCall();
  proposalIds = [];
  for (let i = 0; i < 2; i++) {
    const pi = await newUser({ name: `RA PI ${i}` });
    const { proposal, option, filter, target } = await readyProposal({ user: pi.user, callId: call.id, title: `RA pressure programme ${i}` });
    telescopeId = option.telescopeId;
    if (i === 1) {
      // a longer grey-time request on the same target, and a target that never rises at 40° N
      const base = { instrumentId: option.instrumentId, filterId: filter.id, mode: "exposure", exposureSeconds: "600", framesPerEpoch: "6", maxAirmass: "2", seeingArcsec: "1.2" };
      await createObservation({ user: pi.user, proposalId: proposal.id, input: observationSchema.parse({ ...base, targetId: target.id, epochsPerSemester: "8", moonCategory: "grey" }) });
      const south = await createTarget({ user: pi.user, proposalId: proposal.id, input: targetSchema.parse({ name: "Deepwell Field", ra: "20:40:00", dec: "-78:00:00", pmra: "", pmdec: "", magnitude: "15", band: "V", notes: "" }) });
      await createObservation({ user: pi.user, proposalId: proposal.id, input: observationSchema.parse({ ...base, targetId: south.id, epochsPerSemester: "2", moonCategory: "bright" }) });
    }
    await Proposal.update({ status: "in_review", code: `${String(i + 1).padStart(3, "0")}/${call.semesterCode.slice(2)}`, serial: i + 1, submittedAt: new Date() }, { where: { id: proposal.id } });
    proposalIds.push(proposal.id);
  }
  otherTelescopeId = (await Telescope.findAll({ order: [["id", "ASC"]] })).map((t) => t.id).find((id) => id !== telescopeId)!;
  // a call that offers no time on the other telescope (its rows say 0 h)
  narrowCall = await testCall();
  await CallOffer.update({ hoursOffered: 0 }, { where: { callId: narrowCall.id, telescopeId: otherTelescopeId } });
  // this file's own clear fractions: February 0.6, March 0.75, the rest not set
  savedFractions = (await TelescopeClearFraction.findAll({ where: { telescopeId: [telescopeId, otherTelescopeId] } })).map((f) => ({ telescopeId: f.telescopeId as number, month: f.month, clearFraction: f.clearFraction }));
  await TelescopeClearFraction.destroy({ where: { telescopeId: [telescopeId, otherTelescopeId] } });
  await TelescopeClearFraction.bulkCreate([{ telescopeId, month: 2, clearFraction: 0.6 }, { telescopeId, month: 3, clearFraction: 0.75 }]);
});

afterAll(async () => {
  await TelescopeClearFraction.destroy({ where: { telescopeId: [telescopeId, otherTelescopeId] } });
  await TelescopeClearFraction.bulkCreate(savedFractions);
});

const get = async (path: string, cookie = chair.cookie) => (await request()).get(path).set("Cookie", cookie);

describe("GET /api/v1/calls/:callId/ra-pressure", () => {
  it("has 24 bins summing to the semester's dark hours, each the dark time times that month's clear fraction", async () => {
    const res = await get(`/api/v1/calls/${call.id}/ra-pressure?telescopeId=${telescopeId}`);
    expect(res.status).toBe(200);
    expect(res.body.semester).toMatchObject({ start: "2027-02-01", end: "2027-07-31", nights: 181 });
    const telescope = (await Telescope.findByPk(telescopeId))!;
    expect(res.body.site).toEqual({ latitudeDeg: telescope.latitudeDeg, longitudeDeg: telescope.longitudeDeg, elevationM: telescope.elevationM });
    const bins: Bin[] = res.body.bins;
    expect(bins.map((b) => b.raHour)).toEqual([...Array(24).keys()]);
    // the sheet's own nights (feasibility.ts, rounded to 0.001 h each)
    const nights = (await computeFeasibilitySheet({ proposalId: proposalIds[0] })).sites[telescopeId].nights;
    expect(nights).toHaveLength(181);
    const dark = sum(nights.map((n) => n.darkHours));
    expect(Math.abs(sum(bins.map((b) => b.darkHours)) - dark)).toBeLessThan(0.1);
    expect(Math.abs(res.body.darkHours - dark)).toBeLessThan(0.1);
    const factor = (date: string) => ({ "02": 0.6, "03": 0.75 })[date.slice(5, 7)] ?? 1;
    const available = sum(nights.map((n) => n.darkHours * factor(n.date)));
    expect(available).toBeLessThan(dark - 50);
    expect(Math.abs(sum(bins.map((b) => b.availableDarkHours)) - available)).toBeLessThan(0.1);
    for (const c of ["dark", "grey", "bright"]) {
      expect(Math.abs(sum(bins.map((b) => b.byMoonCategory[c].darkHours)) - sum(nights.map((n) => n.darkHoursByMoonCategory[c as "dark"])))).toBeLessThan(0.1);
    }
    expect(res.body.clearFractions.map((c: { month: number; clearFraction: number; set: boolean }) => [c.month, c.clearFraction, c.set])).toEqual([
      [2, 0.6, true],
      [3, 0.75, true],
      [4, 1, false],
      [5, 1, false],
      [6, 1, false],
      [7, 1, false],
    ]);
  });

  it("spreads exactly the board's requested hours for the telescope, by moon category, and reports a target that never rises", async () => {
    const [res, board] = await Promise.all([get(`/api/v1/calls/${call.id}/ra-pressure?telescopeId=${telescopeId}`), get(`/api/v1/calls/${call.id}/board`)]);
    expect(board.status).toBe(200);
    const bins: Bin[] = res.body.bins;
    const cells = board.body.oversubscription.filter((o: { telescopeId: number }) => o.telescopeId === telescopeId);
    const requested = (c: string) => cells.find((o: { moonCategory: string }) => o.moonCategory === c).requestedHours as number;
    // the never-rising field asks for bright time; it is on the board's sheet but in no bin
    expect(res.body.unplaced).toHaveLength(1);
    expect(res.body.unplaced[0]).toMatchObject({ proposalId: proposalIds[1], code: `002/${call.semesterCode.slice(2)}` });
    const unplaced = res.body.unplaced[0].hours as number;
    expect(unplaced).toBeGreaterThan(0.5);
    expect(requested("grey")).toBeGreaterThan(5);
    for (const c of ["dark", "grey"]) expect(Math.abs(sum(bins.map((b) => b.byMoonCategory[c].requestedHours)) - requested(c)), c).toBeLessThan(0.05);
    expect(Math.abs(sum(bins.map((b) => b.byMoonCategory.bright.requestedHours)) + unplaced - requested("bright"))).toBeLessThan(0.05);
    const all = requested("dark") + requested("grey") + requested("bright");
    expect(Math.abs(sum(bins.map((b) => b.requestedHours)) + unplaced - all)).toBeLessThan(0.05);
    expect(Math.abs(res.body.requestedHours + unplaced - all)).toBeLessThan(0.05);
    // the field at RA 13.1 h, Dec +22° is asked for around its RA, not in the bins opposite
    const around = sum(bins.filter((b) => b.raHour >= 8 && b.raHour <= 18).map((b) => b.requestedHours));
    expect(around).toBeGreaterThan(0.95 * res.body.requestedHours);
    expect(bins[1].requestedHours).toBe(0);
  });

  it("gives the other telescope its own numbers: no requests there and no clear fraction set", async () => {
    const res = await get(`/api/v1/calls/${call.id}/ra-pressure?telescopeId=${otherTelescopeId}`);
    expect(res.status).toBe(200);
    expect(res.body.requestedHours).toBe(0);
    expect(res.body.clearFractions.map((c: { set: boolean; clearFraction: number }) => [c.set, c.clearFraction])).toEqual(Array(6).fill([false, 1]));
    for (const b of res.body.bins as Bin[]) expect(b.availableDarkHours).toBe(b.darkHours);
  });

  it("answers bad input with 400 naming telescopeId, unknown things with 404, and only the chair", async () => {
    for (const query of ["", "?telescopeId=", "?telescopeId=abc", "?telescopeId=-1", "?telescopeId=1.5", `?telescopeId=${telescopeId}&telescopeId=${otherTelescopeId}`, "?telescopeId=%00"]) {
      const res = await get(`/api/v1/calls/${call.id}/ra-pressure${query}`);
      expect(res.status, query).toBe(400);
      expect(res.body.issues.map((i: { path: string }) => i.path), query).toEqual(["telescopeId"]);
    }
    const badCall = await get(`/api/v1/calls/x1/ra-pressure?telescopeId=${telescopeId}`);
    expect(badCall.status).toBe(400);
    expect(JSON.stringify(badCall.body)).toContain("callId");
    expect((await get(`/api/v1/calls/99999999/ra-pressure?telescopeId=${telescopeId}`)).status).toBe(404);
    const notOffered = await get(`/api/v1/calls/${narrowCall.id}/ra-pressure?telescopeId=${otherTelescopeId}`);
    expect(notOffered.status).toBe(404);
    expect(notOffered.body.issues[0].path).toBe("telescopeId");
    expect((await get(`/api/v1/calls/${narrowCall.id}/ra-pressure?telescopeId=99999999`)).status).toBe(404);
    expect((await get(`/api/v1/calls/${narrowCall.id}/ra-pressure?telescopeId=${telescopeId}`)).status).toBe(200);
    expect((await get(`/api/v1/calls/${call.id}/ra-pressure?telescopeId=${telescopeId}`, reviewer.cookie)).status).toBe(403);
    expect((await (await request()).get(`/api/v1/calls/${call.id}/ra-pressure?telescopeId=${telescopeId}`)).status).toBe(401);
  });

  it("the board page says so beside the telescope choice when ?telescopeId= is no telescope of the call", async () => {
    for (const query of ["abc", String(otherTelescopeId), "99999999", "%00"]) {
      const res = await get(`/committee/${narrowCall.id}/board?telescopeId=${query}`);
      expect(res.status, query).toBe(200);
      expect(res.text, query).toContain("Choose one of the telescopes this call offers.");
    }
    const ok = await get(`/committee/${narrowCall.id}/board?telescopeId=${telescopeId}`);
    expect(ok.text).not.toContain("Choose one of the telescopes this call offers.");
    expect(ok.text).toContain("Clear fraction used");
  });
});
