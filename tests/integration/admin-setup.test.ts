// The observatory office's set-up screens: telescopes, instruments, filters and calls. Every action
// through the app's HTTP front (supertest), every refusal with its field's message and the typed
// value kept, every change audited, and none of it open to anyone but an admin.
import { Op } from "sequelize";
import { demoCallPlan } from "../../sequelize/seeders/20261201000100-demo-observatory";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { AuditEntry, Call, CallOffer, Filter, Instrument, Observation, Proposal, Target, Telescope } from "~/models/index.server";
import { observatoryTimeZone } from "~/lib/office/office.server";
import { form, request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";
import { newUser } from "../helpers/session";

const people = ["anonymous", "pi", "reviewer", "chair"] as const;
type Outsider = (typeof people)[number];
const outsiders: Record<Outsider, string> = { anonymous: "", pi: "", reviewer: "", chair: "" };
let admin = "";
let adminId = 0;
const run = Date.now().toString(36).slice(-5);
// What this file creates is removed at the end, so the other test files find the demo as seeded.
const createdCalls: string[] = [];
const createdProposals: number[] = [];

/** What React puts in the HTML for a text: messages are checked as the page shows them. */
function html(text: string) {
  return text.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&#x27;");
}

/** The input named `name` shows `value` (the typed value came back). */
function expectKept(page: string, name: string, value: string, formPrefix?: string) {
  const input = (
    formPrefix
      ? new RegExp(`<input[^>]*id="${formPrefix}-${name.replace(/[^A-Za-z0-9_-]/g, "-")}"[^>]*>`)
      : new RegExp(`<input[^>]*name="${name.replace(/\./g, "\\.")}"[^>]*>`)
  ).exec(page)?.[0];
  expect(input, `input ${name}`).toBeTruthy();
  expect(input).toContain(`value="${html(value)}"`);
}

async function post(path: string, values: Record<string, string | number>, cookie = admin) {
  return (await request()).post(path).set("Cookie", cookie).type("form").send(form(values));
}

async function get(path: string, cookie = admin) {
  return (await request()).get(path).set("Cookie", cookie);
}

async function lastAudit(action: string, entityId?: number) {
  return AuditEntry.findOne({ where: { action, ...(entityId ? { entityId } : {}) }, order: [["id", "DESC"]] });
}

const telescope = (over: Record<string, string> = {}) => ({
  name: `Test ${run} 1.5 m`,
  siteName: "Test Ridge",
  latitudeDeg: "-30.1712",
  longitudeDeg: "-70.8064",
  elevationM: "2200",
  timeZone: "America/Denver",
  apertureM: "1.5",
  centralObstruction: "0.3",
  ...over,
});

const instrument = (over: Record<string, string> = {}) => ({
  name: "Test Imager",
  pixelScaleArcsec: "0.4",
  readNoiseE: "5.2",
  darkEPerPixelPerS: "0.001",
  gainEPerAdu: "1.8",
  fullWellE: "120000",
  readoutSeconds: "20",
  acquisitionSeconds: "180",
  astrometricFloorMas: "3",
  throughput: "0.4",
  ...over,
});

const filter = (over: Record<string, string> = {}) => ({
  band: "V",
  zeroPointPhotons: "8.66e5",
  extinctionMagPerAirmass: "0.14",
  skyDarkMag: "21.8",
  skyGreyMag: "21.0",
  skyBrightMag: "19.6",
  ...over,
});

afterAll(async () => {
  await Proposal.destroy({ where: { id: createdProposals } });
  await Call.destroy({ where: { semesterCode: createdCalls } });
  await Telescope.destroy({ where: { name: { [Op.like]: `Test ${run}%` } } });
});

beforeAll(async () => {
  await ensureDatabase();
  for (const person of people.slice(1) as Outsider[]) {
    outsiders[person] = (await newUser({ roles: person === "pi" ? [] : [person as "reviewer" | "chair"] })).cookie;
  }
  const a = await newUser({ roles: ["admin"], name: "Office Tester" });
  admin = a.cookie;
  adminId = a.user.id;
});

describe("telescopes", () => {
  let telescopeId = 0;

  it("an admin adds a telescope: stored as typed, audited, redirected to its page", async () => {
    const res = await post("/admin/telescopes", { intent: "create", ...telescope() });
    expect(res.status).toBe(302);
    const row = await Telescope.findOne({ where: { name: telescope().name } });
    expect(row).toBeTruthy();
    telescopeId = row!.id;
    expect(res.headers.location).toBe(`/admin/telescopes/${telescopeId}?saved=created`);
    expect(row!.latitudeDeg).toBe(-30.1712);
    expect(row!.longitudeDeg).toBe(-70.8064);
    expect(row!.centralObstruction).toBe(0.3);
    const audit = await lastAudit("telescope.created", telescopeId);
    expect(audit?.actorId).toBe(adminId);
    expect(audit?.entityType).toBe("telescope");
    expect((audit?.details as { values: { name: string } }).values.name).toBe(telescope().name);

    const list = await get("/admin/telescopes");
    expect(list.status).toBe(200);
    expect(list.text).toContain(telescope().name);
    const page = await get(`/admin/telescopes/${telescopeId}`);
    expect(page.status).toBe(200);
    expect(page.text).toContain("America/Denver");
    expect(page.text).toContain('list="iana-time-zones"');
    expect(page.text).toContain('value="Europe/Madrid"');
  });

  const bad: [string, string, string][] = [
    ["name", "", "Enter the telescope's name."],
    ["siteName", "  ", "Enter the site name."],
    ["latitudeDeg", "", "Enter the latitude."],
    ["latitudeDeg", "91", "Latitude must be from -90 to 90° (north positive)."],
    ["longitudeDeg", "-181", "Longitude must be from -180 to 180° (east positive)."],
    ["longitudeDeg", "70,5", "Longitude must be a number (use a point for decimals)."],
    ["elevationM", "abc", "Elevation must be a number (use a point for decimals)."],
    ["elevationM", "9000", "Elevation must be from -500 to 6000 m."],
    ["timeZone", "Mars/Olympus_Mons", "That is not an IANA time zone; pick one from the list, like America/Denver."],
    ["timeZone", "", "Choose the site's time zone."],
    ["apertureM", "0", "Aperture must be from 0.05 to 50 m."],
    ["centralObstruction", "0.95", "Central obstruction must be from 0 to 0.9 of the diameter."],
    ["centralObstruction", "", "Enter the central obstruction."],
  ];
  for (const [field, value, message] of bad) {
    it(`refuses ${field} = ${JSON.stringify(value)} with its message, keeping what was typed`, async () => {
      const before = await Telescope.count();
      const values = telescope({ name: `Bad ${run} ${field}`, [field]: value });
      const res = await post("/admin/telescopes", { intent: "create", ...values });
      expect(res.status).toBe(400);
      expect(res.text).toContain(html(message));
      expectKept(res.text, field === "name" ? "siteName" : "name", field === "name" ? values.siteName : values.name);
      expectKept(res.text, field, value);
      expect(await Telescope.count()).toBe(before);
    });
  }

  it("refuses a second telescope of the same name at the name field", async () => {
    const res = await post("/admin/telescopes", { intent: "create", ...telescope() });
    expect(res.status).toBe(400);
    expect(res.text).toContain(html(`A telescope called “${telescope().name}” already exists.`));
    expect(res.text).toMatch(/id="telescope-create-name-error"/);
  });

  it("an admin edits a telescope; the audit entry lists what changed", async () => {
    const res = await post(`/admin/telescopes/${telescopeId}`, {
      intent: "update",
      ...telescope({ elevationM: "2210.5", timeZone: "America/Santiago" }),
    });
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe(`/admin/telescopes/${telescopeId}?saved=telescope`);
    const row = await Telescope.findByPk(telescopeId);
    expect(row!.elevationM).toBe(2210.5);
    expect(row!.timeZone).toBe("America/Santiago");
    const audit = await lastAudit("telescope.updated", telescopeId);
    expect(audit?.actorId).toBe(adminId);
    expect(audit?.details).toEqual({ changes: { elevationM: [2200, 2210.5], timeZone: ["America/Denver", "America/Santiago"] } });
  });

  it("an edit with a bad value is refused at that field and changes nothing", async () => {
    const res = await post(`/admin/telescopes/${telescopeId}`, { intent: "update", ...telescope({ latitudeDeg: "-95" }) });
    expect(res.status).toBe(400);
    expect(res.text).toContain(html("Latitude must be from -90 to 90° (north positive)."));
    expectKept(res.text, "latitudeDeg", "-95");
    expect((await Telescope.findByPk(telescopeId))!.latitudeDeg).toBe(-30.1712);
  });

  it("an unknown telescope is a 404 page", async () => {
    expect((await get("/admin/telescopes/999999")).status).toBe(404);
    expect((await get("/admin/telescopes/abc")).status).toBe(404);
  });

  describe("instruments and filters", () => {
    let instrumentId = 0;

    it("an admin adds an instrument to the telescope, audited", async () => {
      const res = await post(`/admin/telescopes/${telescopeId}`, { intent: "createInstrument", ...instrument() });
      expect(res.status).toBe(302);
      const row = await Instrument.findOne({ where: { telescopeId, name: "Test Imager" } });
      expect(row).toBeTruthy();
      instrumentId = row!.id;
      expect(res.headers.location).toBe(`/admin/instruments/${instrumentId}?saved=created`);
      expect(row!.darkEPerPixelPerS).toBe(0.001);
      expect(row!.throughput).toBe(0.4);
      const audit = await lastAudit("instrument.created", instrumentId);
      expect(audit?.actorId).toBe(adminId);
      expect((audit?.details as { telescopeId: number }).telescopeId).toBe(telescopeId);
      const page = await get(`/admin/instruments/${instrumentId}`);
      expect(page.status).toBe(200);
      for (const unit of ["″/pixel", "e⁻/pixel/s", "e⁻/ADU", "mas", "photons s⁻¹ cm⁻² at mag 0", "mag/airmass", "mag/arcsec²"]) {
        expect(page.text).toContain(unit);
      }
    });

    const badInstrument: [string, string, string][] = [
      ["name", "", "Enter the instrument's name."],
      ["pixelScaleArcsec", "", "Enter the pixel scale."],
      ["pixelScaleArcsec", "0", "Pixel scale must be more than 0 and at most 20 ″/pixel."],
      ["readNoiseE", "-1", "Read noise must be from 0 to 200 e⁻."],
      ["darkEPerPixelPerS", "lots", "Dark current must be a number (use a point for decimals)."],
      ["gainEPerAdu", "0", "Gain must be more than 0 and at most 100 e⁻/ADU."],
      ["fullWellE", "50", "Full well must be from 100 to 1e7 e⁻."],
      ["readoutSeconds", "", "Enter the readout overhead."],
      ["acquisitionSeconds", "-5", "Acquisition overhead must be from 0 to 7200 s."],
      ["astrometricFloorMas", "", "Enter the systematic astrometric floor."],
      ["throughput", "1.5", "Throughput must be more than 0 and at most 1."],
      ["throughput", "0", "Throughput must be more than 0 and at most 1."],
    ];
    for (const [field, value, message] of badInstrument) {
      it(`refuses an instrument with ${field} = ${JSON.stringify(value)}`, async () => {
        const before = await Instrument.count();
        const res = await post(`/admin/telescopes/${telescopeId}`, { intent: "createInstrument", ...instrument({ name: "Second Imager", [field]: value }) });
        expect(res.status).toBe(400);
        expect(res.text).toContain(html(message));
        expectKept(res.text, field, value, "instrument-createInstrument");
        expect(await Instrument.count()).toBe(before);
      });
    }

    it("refuses a second instrument of the same name on the telescope", async () => {
      const res = await post(`/admin/telescopes/${telescopeId}`, { intent: "createInstrument", ...instrument() });
      expect(res.status).toBe(400);
      expect(res.text).toContain("already has an instrument called");
    });

    it("an admin edits the instrument, audited with the changes", async () => {
      const res = await post(`/admin/instruments/${instrumentId}`, { intent: "update", ...instrument({ readNoiseE: "4.9", throughput: "0.45" }) });
      expect(res.status).toBe(302);
      const row = await Instrument.findByPk(instrumentId);
      expect(row!.readNoiseE).toBe(4.9);
      expect(row!.throughput).toBe(0.45);
      const audit = await lastAudit("instrument.updated", instrumentId);
      expect(audit?.details).toEqual({ changes: { readNoiseE: [5.2, 4.9], throughput: [0.4, 0.45] } });
    });

    it("an edit of the instrument with a bad value keeps what was typed", async () => {
      const res = await post(`/admin/instruments/${instrumentId}`, { intent: "update", ...instrument({ gainEPerAdu: "" }) });
      expect(res.status).toBe(400);
      expect(res.text).toContain("Enter the gain.");
      expectKept(res.text, "gainEPerAdu", "");
      expect((await Instrument.findByPk(instrumentId))!.gainEPerAdu).toBe(1.8);
    });

    let filterId = 0;
    it("an admin adds, edits and deletes filter rows, each audited", async () => {
      const added = await post(`/admin/instruments/${instrumentId}`, { intent: "createFilter", ...filter() });
      expect(added.status).toBe(200);
      const v = await Filter.findOne({ where: { instrumentId, band: "V" } });
      expect(v!.zeroPointPhotons).toBe(866000);
      filterId = v!.id;
      expect((await lastAudit("filter.created", filterId))?.actorId).toBe(adminId);

      const r = await post(`/admin/instruments/${instrumentId}`, { intent: "createFilter", ...filter({ band: "R", zeroPointPhotons: "1.07e6", extinctionMagPerAirmass: "0.1", skyDarkMag: "20.9", skyGreyMag: "20.4", skyBrightMag: "19.3" }) });
      expect(r.status).toBe(200);
      const rRow = await Filter.findOne({ where: { instrumentId, band: "R" } });

      const edited = await post(`/admin/instruments/${instrumentId}`, { intent: "updateFilter", filterId, ...filter({ extinctionMagPerAirmass: "0.15" }) });
      expect(edited.status).toBe(200);
      expect((await Filter.findByPk(filterId))!.extinctionMagPerAirmass).toBe(0.15);
      expect((await lastAudit("filter.updated", filterId))?.details).toEqual({ instrumentId, changes: { extinctionMagPerAirmass: [0.14, 0.15] } });

      const deleted = await post(`/admin/instruments/${instrumentId}`, { intent: "deleteFilter", filterId: rRow!.id });
      expect(deleted.status).toBe(200);
      expect(await Filter.findByPk(rRow!.id)).toBeNull();
      expect((await lastAudit("filter.deleted", rRow!.id))?.details).toEqual({ instrumentId, band: "R" });

      const page = await get(`/admin/instruments/${instrumentId}`);
      expectKept(page.text, "zeroPointPhotons", "866000");
    });

    const badFilter: [Record<string, string>, string, string, string][] = [
      [{ band: "" }, "band", "", "Enter the band's name, like V or r′."],
      [{ zeroPointPhotons: "" }, "zeroPointPhotons", "", "Enter the zero point."],
      [{ zeroPointPhotons: "-3" }, "zeroPointPhotons", "-3", "Zero point must be more than 0 and at most 1e8 photons s⁻¹ cm⁻²."],
      [{ extinctionMagPerAirmass: "x" }, "extinctionMagPerAirmass", "x", "Extinction must be a number (use a point for decimals)."],
      [{ skyDarkMag: "30" }, "skyDarkMag", "30", "Dark sky must be from 10 to 26 mag/arcsec²."],
      [{ skyGreyMag: "22.5" }, "skyGreyMag", "22.5", "Grey sky cannot be darker (a larger number) than dark sky."],
      [{ skyBrightMag: "" }, "skyBrightMag", "", "Enter the bright sky."],
    ];
    for (const [over, field, value, message] of badFilter) {
      it(`refuses a filter with ${field} = ${JSON.stringify(value)}`, async () => {
        const before = await Filter.count({ where: { instrumentId } });
        const res = await post(`/admin/instruments/${instrumentId}`, { intent: "createFilter", ...filter({ band: "B", ...over }) });
        expect(res.status).toBe(400);
        expect(res.text).toContain(html(message));
        expect(res.text).toContain(`id="filter-new-${field}-error"`);
        expectKept(res.text, field, value, "filter-new");
        expect(await Filter.count({ where: { instrumentId } })).toBe(before);
      });
    }

    it("refuses a second filter of the same band, on create and on edit", async () => {
      const res = await post(`/admin/instruments/${instrumentId}`, { intent: "createFilter", ...filter() });
      expect(res.status).toBe(400);
      expect(res.text).toContain("This instrument already has a V filter.");
      await post(`/admin/instruments/${instrumentId}`, { intent: "createFilter", ...filter({ band: "I", skyDarkMag: "19.9", skyGreyMag: "19.6", skyBrightMag: "19" }) });
      const i = await Filter.findOne({ where: { instrumentId, band: "I" } });
      const clash = await post(`/admin/instruments/${instrumentId}`, { intent: "updateFilter", filterId: i!.id, ...filter() });
      expect(clash.status).toBe(400);
      expect(clash.text).toContain("This instrument already has a V filter.");
      expect((await Filter.findByPk(i!.id))!.band).toBe("I");
    });

    it("a filter of another instrument cannot be edited through this one", async () => {
      const other = await Filter.findOne({ where: { instrumentId: { [Op.ne]: instrumentId } } });
      const res = await post(`/admin/instruments/${instrumentId}`, { intent: "updateFilter", filterId: other!.id, ...filter({ band: "Z" }) });
      expect(res.status).toBe(404);
      expect((await Filter.findByPk(other!.id))!.band).not.toBe("Z");
    });

    it("deleting an instrument, a filter or a telescope in use is refused with a message, not a 500", async () => {
      const call = await Call.findOne({ order: [["id", "ASC"]] });
      const pi = await newUser();
      const proposal = await Proposal.create({
        callId: call!.id,
        title: "Uses the test imager",
        abstract: "—",
        scienceCategory: null,
        semestersRequested: [call!.semesterCode],
        createdById: pi.user.id,
      });
      createdProposals.push(proposal.id);
      const target = await Target.create({
        proposalId: proposal.id, name: "Field A", raDeg: 10, decDeg: 20, pmRaMasPerYr: null, pmDecMasPerYr: null, magnitude: 18, band: "V", notes: null,
      });
      await Observation.create({
        proposalId: proposal.id, targetId: target.id, instrumentId, filterId, snrGoal: 50, exposureSeconds: null, baselineYears: null, requiredPmPrecisionMasPerYr: null,
      });

      const i = await post(`/admin/instruments/${instrumentId}`, { intent: "delete" });
      expect(i.status).toBe(400);
      expect(i.text).toContain("Test Imager cannot be deleted: 1 observation in proposals uses it.");
      expect(await Instrument.findByPk(instrumentId)).toBeTruthy();

      const f = await post(`/admin/instruments/${instrumentId}`, { intent: "deleteFilter", filterId });
      expect(f.status).toBe(400);
      expect(f.text).toContain("The V filter cannot be deleted: 1 observation in proposals uses it.");
      expect(await Filter.findByPk(filterId)).toBeTruthy();

      const t = await post(`/admin/telescopes/${telescopeId}`, { intent: "delete" });
      expect(t.status).toBe(400);
      expect(t.text).toContain("cannot be deleted: 1 observation in proposals uses it (through its instruments). Change those observations first");
      expect(await Telescope.findByPk(telescopeId)).toBeTruthy();
      expect(await lastAudit("instrument.deleted", instrumentId)).toBeNull();

      await proposal.destroy();
    });

    it("an unused instrument is deleted, audited, and the telescope's page says so", async () => {
      await post(`/admin/telescopes/${telescopeId}`, { intent: "createInstrument", ...instrument({ name: "Spare Imager" }) });
      const spare = await Instrument.findOne({ where: { telescopeId, name: "Spare Imager" } });
      const res = await post(`/admin/instruments/${spare!.id}`, { intent: "delete" });
      expect(res.status).toBe(302);
      expect(res.headers.location).toBe(`/admin/telescopes/${telescopeId}?deleted=Spare%20Imager`);
      expect(await Instrument.findByPk(spare!.id)).toBeNull();
      expect((await lastAudit("instrument.deleted", spare!.id))?.actorId).toBe(adminId);
    });
  });
});

describe("calls", () => {
  const code = `${2300 + Math.floor(Math.random() * 600)}A`;
  createdCalls.push(code);
  let zone = "UTC";
  let telescopes: Telescope[] = [];
  let callId = 0;

  beforeAll(async () => {
    zone = await observatoryTimeZone();
    telescopes = await Telescope.findAll({ order: [["id", "ASC"]], limit: 2 });
  });

  // the form names its button: "create" on /admin/calls/new, "update" on a call's page
  const call = (over: Record<string, string> = {}, intent = "create") => {
    const year = Number(code.slice(0, 4));
    const values: Record<string, string> = {
      intent,
      semesterCode: code,
      title: `Call for proposals ${code}`,
      opensAt: `${year - 1}-09-01T09:00`,
      deadlineAt: `${year - 1}-10-15T17:00`,
      semesterStart: `${year}-02-01`,
      semesterEnd: `${year}-07-31`,
      pageLimit: "4",
      currency: "eur",
      accessFee: "950",
      pageCharge: "180.50",
    };
    for (const t of telescopes) {
      values[`offer-${t.id}-dark`] = "300";
      values[`offer-${t.id}-grey`] = "250.5";
      values[`offer-${t.id}-bright`] = "0";
    }
    return { ...values, ...over };
  };

  it("an admin creates a call: times read in the observatory's zone and stored in UTC, offers stored, audited", async () => {
    const page = await get("/admin/calls/new");
    expect(page.status).toBe(200);
    expect(page.text).toContain(`(${zone})`);
    // ISO text inputs, not the browser's locale-formatted date pickers
    expect(page.text).not.toMatch(/type="(date|datetime-local)"/);
    for (const name of ["opensAt", "deadlineAt"]) {
      const input = new RegExp(`<input[^>]*name="${name}"[^>]*>`).exec(page.text)?.[0] ?? "";
      expect(input, name).toContain('type="text"');
      expect(input, name).toContain('placeholder="YYYY-MM-DD HH:MM"');
      expect(input, name).toContain('pattern="\\d{4}-\\d{2}-\\d{2}[T ]\\d{2}:\\d{2}"');
    }
    for (const name of ["semesterStart", "semesterEnd"]) {
      const input = new RegExp(`<input[^>]*name="${name}"[^>]*>`).exec(page.text)?.[0] ?? "";
      expect(input, name).toContain('type="text"');
      expect(input, name).toContain('placeholder="YYYY-MM-DD"');
    }
    const res = await post("/admin/calls/new", call({ timeZone: "Pacific/Kiritimati" }));
    expect(res.status).toBe(302);
    expect(res.headers.location).toBe(`/admin/calls?saved=${code}`);
    const row = await Call.findOne({ where: { semesterCode: code }, include: [{ model: CallOffer, as: "offers" }] });
    expect(row).toBeTruthy();
    callId = row!.id;
    const year = Number(code.slice(0, 4));
    // The zone the form claims is ignored: the wall clock is the observatory's (the demo's
    // Europe/Madrid). tz database fact: Madrid keeps CEST = UTC+2 from the last Sunday of March
    // to the last Sunday of October (the EU rule since 1996), so 1 September and mid-October
    // (before the 25th, the earliest possible last Sunday) are 2 hours ahead of UTC.
    expect(zone).toBe("Europe/Madrid");
    expect(row!.opensAt.toISOString()).toBe(`${year - 1}-09-01T07:00:00.000Z`);
    expect(row!.deadlineAt.toISOString()).toBe(`${year - 1}-10-15T15:00:00.000Z`);
    expect(row!.accessFeePerHourCents).toBe(95_000);
    expect(row!.pageChargeCents).toBe(18_050);
    const offers = (row!.offers ?? []).map((o) => [o.telescopeId, o.moonCategory, o.hoursOffered]).sort();
    expect(offers).toEqual(telescopes.flatMap((t) => [[t.id, "dark", 300], [t.id, "grey", 250.5]]).sort());
    const audit = await lastAudit("call.created", callId);
    expect(audit?.actorId).toBe(adminId);
    expect((audit?.details as { values: { semesterCode: string } }).values.semesterCode).toBe(code);

    const list = await get("/admin/calls");
    expect(list.text).toContain(code);
    expect(list.text).toContain("UTC");
  });

  it("refuses a semester code that already has a call, at the code field", async () => {
    const res = await post("/admin/calls/new", call({ title: "Again" }));
    expect(res.status).toBe(400);
    expect(res.text).toContain(html(`Semester ${code} already has a call; edit that one, or choose another semester.`));
    expect(res.text).toContain('id="call-create-semesterCode-error"');
    expectKept(res.text, "title", "Again");
    expect(await Call.count({ where: { semesterCode: code } })).toBe(1);
  });

  const other = `${2300 + ((Number(code.slice(0, 4)) - 2300 + 300) % 600)}B`;
  const y = Number(other.slice(0, 4));
  const badCalls: [string, Record<string, string>, string, string][] = [
    ["a malformed semester code", { semesterCode: "2027C" }, "semesterCode", "A semester code is the year and A or B, like 2027A."],
    ["an empty title", { title: "" }, "title", "Enter the title."],
    ["an opening after the deadline", { opensAt: `${y}-06-20T10:00`, deadlineAt: `${y}-06-15T17:00` }, "deadlineAt", "The deadline must come after the opening."],
    ["a deadline after the semester starts", { deadlineAt: `${y}-08-02T12:00` }, "deadlineAt", `The deadline must come before the semester starts (${y}-08-01).`],
    ["a deadline that is not a date", { deadlineAt: "soon" }, "deadlineAt", "The deadline is not a date and time (YYYY-MM-DD HH:MM)."],
    ["no opening", { opensAt: "" }, "opensAt", "Enter the opening (date and time at the observatory)."],
    ["a semester that ends before it starts", { semesterEnd: `${y}-07-01` }, "semesterEnd", "The semester must end after it starts."],
    ["a semester of six weeks", { semesterEnd: `${y}-09-15` }, "semesterEnd", "A semester lasts at least 3 months; this one is shorter."],
    ["a semester of two years", { semesterEnd: `${y + 2}-07-31` }, "semesterEnd", "A semester lasts at most 13 months; this one is longer."],
    ["a semester start that is no date", { semesterStart: `${y}-02-30` }, "semesterStart", "The semester start is not a date (YYYY-MM-DD)."],
    ["an empty page limit", { pageLimit: "" }, "pageLimit", "Enter the page limit."],
    ["a fractional page limit", { pageLimit: "2.5" }, "pageLimit", "Page limit must be a whole number."],
    ["an unknown currency", { currency: "xyz" }, "currency", "Choose the currency of the charges."],
    ["an access fee in fractions of a cent", { accessFee: "9.999" }, "accessFee", "Access fee has at most two decimals."],
    ["a negative page charge", { pageCharge: "-1" }, "pageCharge", "Page charge must be from 0 to 1e6."],
  ];
  for (const [what, over, field, message] of badCalls) {
    it(`refuses ${what} with the message at ${field}`, async () => {
      const values = call({
        semesterCode: other,
        title: `Call ${other}`,
        opensAt: `${y}-04-01T09:00`,
        deadlineAt: `${y}-06-15T17:00`,
        semesterStart: `${y}-08-01`,
        semesterEnd: `${y + 1}-01-31`,
        ...over,
      });
      const res = await post("/admin/calls/new", values);
      expect(res.status).toBe(400);
      expect(res.text).toContain(html(message));
      expect(res.text).toContain(`id="call-create-${field}-error"`);
      if (field !== "currency") expectKept(res.text, field, values[field]);
      expect(await Call.count({ where: { semesterCode: other } })).toBe(0);
    });
  }

  it("refuses an empty or negative cell of the hours grid at that cell", async () => {
    const t = telescopes[0];
    for (const [value, message] of [["", "Enter the hours offered."], ["-4", "Hours offered must be from 0 to 5000 h."]]) {
      const res = await post("/admin/calls/new", call({ semesterCode: other, [`offer-${t.id}-grey`]: value, opensAt: `${y}-04-01T09:00`, deadlineAt: `${y}-06-15T17:00`, semesterStart: `${y}-08-01`, semesterEnd: `${y + 1}-01-31` }));
      expect(res.status).toBe(400);
      expect(res.text).toContain(html(message));
      expect(res.text).toContain(`id="call-create-offer-${t.id}-grey-error"`);
      expectKept(res.text, `offer-${t.id}-grey`, value);
    }
    expect(await Call.count({ where: { semesterCode: other } })).toBe(0);
  });

  it("an admin edits a call: dates, page limit and the grid; the audit entry has before and after", async () => {
    const t = telescopes[0];
    const year = Number(code.slice(0, 4));
    // typed with a space between date and time (the form's placeholder); "T" works as well (above)
    const res = await post(`/admin/calls/${callId}`, call({ deadlineAt: `${year - 1}-10-20 12:00`, pageLimit: "6", [`offer-${t.id}-bright`]: "120" }, "update"));
    expect(res.status).toBe(302);
    const row = await Call.findByPk(callId, { include: [{ model: CallOffer, as: "offers" }] });
    expect(row!.pageLimit).toBe(6);
    expect(row!.deadlineAt.toISOString()).toBe(`${year - 1}-10-20T10:00:00.000Z`); // 12:00 CEST (UTC+2, as above)
    expect(row!.offers!.find((o) => o.telescopeId === t.id && o.moonCategory === "bright")?.hoursOffered).toBe(120);
    const audit = await lastAudit("call.updated", callId);
    const details = audit?.details as { changes: Record<string, [unknown, unknown]>; offers: [Record<string, number>, Record<string, number>] };
    expect(audit?.actorId).toBe(adminId);
    expect(details.changes.pageLimit).toEqual([4, 6]);
    expect(Object.keys(details.changes).sort()).toEqual(["deadlineAt", "pageLimit"]);
    expect(details.offers[0][`${t.id}.bright`]).toBeUndefined();
    expect(details.offers[1][`${t.id}.bright`]).toBe(120);

    const page = await get(`/admin/calls/${callId}`);
    expect(page.status).toBe(200);
    expectKept(page.text, "deadlineAt", `${year - 1}-10-20 12:00`); // shown as every date is: YYYY-MM-DD HH:MM
    expectKept(page.text, `offer-${t.id}-bright`, "120");
  });

  it("an edit that moves the deadline past the semester start is refused and changes nothing", async () => {
    const year = Number(code.slice(0, 4));
    const res = await post(`/admin/calls/${callId}`, call({ deadlineAt: `${year}-03-01T12:00` }, "update"));
    expect(res.status).toBe(400);
    expect(res.text).toContain(html(`The deadline must come before the semester starts (${year}-02-01).`));
    expect(res.text).toContain('id="call-update-deadlineAt-error"');
    expectKept(res.text, "deadlineAt", `${year}-03-01T12:00`);
    expect((await Call.findByPk(callId))!.deadlineAt.toISOString()).toBe(`${year - 1}-10-20T10:00:00.000Z`);
  });

  it("an edit may not take another call's semester code", async () => {
    // the demo's open call, whose semester depends on the day the demo was seeded
    const seeded = await Call.findOne({ where: { semesterCode: demoCallPlan().open.semesterCode } });
    const res = await post(`/admin/calls/${callId}`, call({ semesterCode: seeded!.semesterCode }, "update"));
    expect(res.status).toBe(400);
    expect(res.text).toContain(`Semester ${seeded!.semesterCode} already has a call`);
    expect((await Call.findByPk(callId))!.semesterCode).toBe(code);
  });

  it("the public Open calls page shows open and announced calls with their telescopes, hours, deadline in UTC and local time", async () => {
    const now = Date.now();
    const local = (ms: number) => new Date(ms).toISOString().slice(0, 16);
    // Open now (deadline in ten days) and announced (opens in a month); a closed one is not shown.
    // semesters no other call holds (other files' calls take random semesters too)
    const taken = new Set((await Call.findAll({ attributes: ["semesterCode"] })).map((c) => c.semesterCode));
    const free = (half: "A" | "B", from: number) => {
      for (let k = 0; k < 600; k++) {
        const candidate = `${2300 + ((from - 2300 + k) % 600)}${half}`;
        if (!taken.has(candidate)) return (taken.add(candidate), candidate);
      }
      throw new Error("no free semester");
    };
    const openCode = free("A", Number(code.slice(0, 4)) + 150);
    const soonCode = free("B", Number(code.slice(0, 4)) + 150);
    const openCall = await Call.create({
      semesterCode: openCode, title: `Open call ${openCode}`, opensAt: new Date(now - 86_400_000), deadlineAt: new Date(now + 10 * 86_400_000),
      semesterStart: local(now + 40 * 86_400_000).slice(0, 10), semesterEnd: local(now + 220 * 86_400_000).slice(0, 10), pageLimit: 3,
    });
    await CallOffer.create({ callId: openCall.id, telescopeId: telescopes[0].id, moonCategory: "dark", hoursOffered: 123 });
    await Call.create({
      semesterCode: soonCode, title: `Announced call ${soonCode}`, opensAt: new Date(now + 30 * 86_400_000), deadlineAt: new Date(now + 90 * 86_400_000),
      semesterStart: local(now + 120 * 86_400_000).slice(0, 10), semesterEnd: local(now + 300 * 86_400_000).slice(0, 10), pageLimit: 5,
    });
    const closedCode = free("A", Number(code.slice(0, 4)) + 450);
    createdCalls.push(openCode, soonCode, closedCode);
    await Call.create({
      semesterCode: closedCode, title: `Closed call ${closedCode}`, opensAt: new Date(now - 60 * 86_400_000), deadlineAt: new Date(now - 86_400_000),
      semesterStart: local(now + 20 * 86_400_000).slice(0, 10), semesterEnd: local(now + 200 * 86_400_000).slice(0, 10), pageLimit: 4,
    });
    const res = await (await request()).get("/calls");
    expect(res.status).toBe(200);
    expect(res.text).toContain(`Open call ${openCode}`);
    expect(res.text).toContain(`Announced call ${soonCode}`);
    expect(res.text).not.toContain(`Closed call ${closedCode}`);
    expect(res.text).toContain(`href="/proposals/new?call=${openCode}"`);
    expect(res.text).not.toContain(`href="/proposals/new?call=${soonCode}"`);
    expect(res.text).toContain(telescopes[0].name);
    expect(res.text).toContain(">123<");
    expect(res.text).toContain(`${openCall.deadlineAt.toISOString().slice(0, 16).replace("T", " ")} UTC`);
    expect(res.text).toContain(`Observatory time (${telescopes[0].timeZone})`);
    expect(res.text).toContain("Time left until the deadline");
    expect(res.text).toContain('href="/calls"');
  });
});

describe("the office's home", () => {
  it("links the telescopes and calls sections", async () => {
    const res = await get("/admin");
    expect(res.status).toBe(200);
    expect(res.text).toContain('href="/admin/telescopes"');
    expect(res.text).toContain('href="/admin/calls"');
  });
});

describe("only an admin may use the set-up screens", () => {
  let telescopeId = 0;
  let instrumentId = 0;
  let callId = 0;
  beforeAll(async () => {
    const t = await Telescope.findOne({ order: [["id", "ASC"]] });
    telescopeId = t!.id;
    instrumentId = (await Instrument.findOne({ where: { telescopeId } }))!.id;
    callId = (await Call.findOne({ order: [["id", "ASC"]] }))!.id;
  });
  const paths = () => [
    "/admin/telescopes",
    `/admin/telescopes/${telescopeId}`,
    `/admin/instruments/${instrumentId}`,
    "/admin/calls",
    "/admin/calls/new",
    `/admin/calls/${callId}`,
  ];

  for (const person of people) {
    const expected = person === "anonymous" ? 302 : 403;
    it(`${person}: every page answers ${expected}`, async () => {
      for (const path of paths()) {
        const res = await get(path, outsiders[person]);
        expect(res.status, path).toBe(expected);
        if (expected === 302) expect(res.headers.location).toBe(`/sign-in?redirectTo=${encodeURIComponent(path)}`);
        if (expected === 403) expect(res.text).toContain("Not for your account");
      }
    });

    it(`${person}: every action is refused (${expected}) and changes nothing`, async () => {
      const audits = await AuditEntry.count();
      const before = { t: await Telescope.count(), i: await Instrument.count(), f: await Filter.count(), c: await Call.count() };
      const posts: [string, Record<string, string | number>][] = [
        ["/admin/telescopes", { intent: "create", ...telescope({ name: `Intruder ${person}` }) }],
        [`/admin/telescopes/${telescopeId}`, { intent: "update", ...telescope({ name: `Intruder ${person}` }) }],
        [`/admin/telescopes/${telescopeId}`, { intent: "createInstrument", ...instrument({ name: `Intruder ${person}` }) }],
        [`/admin/telescopes/${telescopeId}`, { intent: "delete" }],
        [`/admin/instruments/${instrumentId}`, { intent: "update", ...instrument({ name: `Intruder ${person}` }) }],
        [`/admin/instruments/${instrumentId}`, { intent: "createFilter", ...filter({ band: "Q" }) }],
        [`/admin/instruments/${instrumentId}`, { intent: "delete" }],
        ["/admin/calls/new", { intent: "create", semesterCode: "2999A", title: "Intruder" }],
        [`/admin/calls/${callId}`, { intent: "update", semesterCode: "2999B", title: "Intruder" }],
      ];
      for (const [path, values] of posts) {
        const res = await post(path, values, outsiders[person]);
        expect(res.status, `${path} ${values.intent ?? ""}`).toBe(expected);
      }
      expect({ t: await Telescope.count(), i: await Instrument.count(), f: await Filter.count(), c: await Call.count() }).toEqual(before);
      expect(await Telescope.count({ where: { name: `Intruder ${person}` } })).toBe(0);
      expect(await AuditEntry.count()).toBe(audits);
    });
  }
});
