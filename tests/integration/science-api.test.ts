import { beforeAll, describe, expect, it } from "vitest";
import { Instrument, Telescope } from "~/models/index.server";
import { request } from "../helpers/app";
import { ensureDatabase } from "../helpers/db";

// An invented site and target; nothing here is a real observatory or object.
const SITE_QUERY = "lat=31.3&lon=-108.7&elevation=2100&timeZone=America/Denver";
const TARGET_QUERY = "ra=05:36:48&dec=+18:30:00";

let telescopeId = 0;
let instrumentId = 0;

beforeAll(async () => {
  await ensureDatabase();
  const t = await Telescope.findOne({ order: [["id", "ASC"]] });
  const i = await Instrument.findOne({ where: { telescopeId: t!.id } });
  telescopeId = t!.id;
  instrumentId = i!.id;
});

function expectIssues(res: { status: number; body: { error?: string; issues?: { path: string; message: string }[] } }, label: string) {
  expect(res.status, `${label}: ${JSON.stringify(res.body).slice(0, 300)}`).toBe(400);
  expect(typeof res.body.error, label).toBe("string");
  expect(Array.isArray(res.body.issues) && res.body.issues.length > 0, label).toBe(true);
  for (const issue of res.body.issues!) {
    expect(typeof issue.path).toBe("string");
    expect(typeof issue.message).toBe("string");
  }
}

describe("GET /api/v1/visibility", () => {
  it("answers to the contract for a site given by coordinates", async () => {
    const res = await (await request()).get(`/api/v1/visibility?${SITE_QUERY}&${TARGET_QUERY}&from=2027-10-01&nights=30&minAltitude=30`);
    expect(res.status).toBe(200);
    expect(res.body.target.raDeg).toBeCloseTo(84.2, 6);
    expect(res.body.nights).toHaveLength(30);
    const n = res.body.nights[0];
    expect(Object.keys(n)).toEqual(expect.arrayContaining(["date", "sunset", "sunrise", "darkStart", "darkEnd", "windows", "observableHours", "moon", "moonCategory"]));
    expect(n.date).toBe("2027-10-01");
    expect(n.sunset).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}\.\d{3}Z$/);
    expect(Object.keys(n.moon)).toEqual(expect.arrayContaining(["illumination", "separationDeg"]));
    for (const night of res.body.nights) {
      for (const w of night.windows) {
        expect(w.start >= night.darkStart && w.end <= night.darkEnd).toBe(true);
      }
    }
    expect(Object.keys(res.body.summary.byMoonCategory).sort()).toEqual(["bright", "dark", "grey"]);
    expect(res.body.summary.observableHours).toBeGreaterThan(0);
  });

  it("takes maxAirmass instead of minAltitude, and a telescope id instead of the site", async () => {
    const res = await (await request()).get(`/api/v1/visibility?telescope=${telescopeId}&${TARGET_QUERY}&from=2027-02-01&nights=3&maxAirmass=1.5&night=2027-02-01`);
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
    expect(res.body.limit.maxAirmass).toBe(1.5);
    expect(res.body.curve.points.length).toBeGreaterThan(20);
    expect(res.body.conventions.moonCategoryThresholds.darkBelow).toBe(0.35);
  });

  it("answers bad input with 400 and zod issues, never 500", async () => {
    const agent = await request();
    const base = `${SITE_QUERY}&${TARGET_QUERY}&from=2027-10-01&nights=10`;
    const bad = [
      "",
      `${TARGET_QUERY}&from=2027-10-01&nights=10`, // no site
      base.replace("lat=31.3", "lat=95"),
      base.replace("lon=-108.7", "lon=abc"),
      base.replace("ra=05:36:48", "ra=25:00:00"),
      base.replace("dec=+18:30:00", "dec=+91:00:00"),
      base.replace("dec=+18:30:00", "dec=north"),
      base.replace("from=2027-10-01", "from=2027-02-30"),
      base.replace("from=2027-10-01", "from=yesterday"),
      base.replace("nights=10", "nights=367"),
      base.replace("nights=10", "nights=0"),
      base.replace("nights=10", "nights=2.5"),
      `${base}&minAltitude=30&maxAirmass=2`,
      `${base}&maxAirmass=0.5`,
      `${base}&minAltitude=-5`,
      base.replace("timeZone=America/Denver", "timeZone=Mars/Olympus"),
      `${TARGET_QUERY}&from=2027-10-01&nights=10&telescope=999999`,
      `${TARGET_QUERY}&from=2027-10-01&nights=10&telescope=x`,
    ];
    for (const query of bad) expectIssues(await agent.get(`/api/v1/visibility?${query}`), query);
  });

  it("names the field and the range of a bad coordinate", async () => {
    const res = await (await request()).get(`/api/v1/visibility?${SITE_QUERY}&ra=24:10:00&dec=0&from=2027-10-01&nights=1`);
    expect(res.status).toBe(400);
    expect(res.body.issues[0].path).toBe("ra");
    expect(res.body.issues[0].message).toMatch(/RA/);
  });
});

const exposureBody = {
  band: "V",
  magnitude: 19,
  snr: 30,
  airmass: 1.2,
  seeingArcsec: 1.1,
  moonCategory: "grey",
  telescope: { apertureM: 2.4, centralObstruction: 0.3 },
  instrument: { throughput: 0.55, pixelScaleArcsec: 0.35, readNoiseE: 4, darkEPerPixelPerS: 0.001, fullWellE: 90000 },
};

describe("POST /api/v1/exposure", () => {
  it("returns totals that satisfy the CCD equation", async () => {
    const res = await (await request()).post("/api/v1/exposure").send(exposureBody);
    expect(res.status).toBe(200);
    const r = res.body;
    for (const key of ["exposureSeconds", "snr", "sourceElectrons", "skyElectronsPerPixel", "darkElectronsPerPixel", "pixels", "peakPixelElectrons", "saturated"]) {
      expect(r, key).toHaveProperty(key);
    }
    const snr = r.sourceElectrons / Math.sqrt(r.sourceElectrons + r.pixels * (r.skyElectronsPerPixel + r.darkElectronsPerPixel + 16));
    expect(snr).toBeCloseTo(30, 6);
    const back = await (await request()).post("/api/v1/exposure").send({ ...exposureBody, snr: undefined, exposureSeconds: r.exposureSeconds });
    expect(back.body.snr).toBeCloseTo(30, 6);
  });

  it("looks up the telescope and the instrument with its filter", async () => {
    const res = await (await request())
      .post("/api/v1/exposure")
      .send({ band: "R", magnitude: 17, exposureSeconds: 300, airmass: 1.3, seeingArcsec: 1, telescopeId, instrumentId });
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
    expect(res.body.snr).toBeGreaterThan(10);
  });

  it("takes the sky from the Krisciunas & Schaefer model when the Moon is given", async () => {
    // Check value 19.6681 V mag/arcsec²: K&S (1991) eqs. 1–3, 15–21 written out by hand in Python
    // (not with our module) for k = 0.15 and a dark zenith sky of 21.6 (the demo defaults for V),
    // a 75 % lit Moon (α = 60°) 45° away at altitude 50°, the target at altitude 60°.
    const { moonCategory: _drop, airmass: _a, ...rest } = exposureBody;
    const res = await (await request())
      .post("/api/v1/exposure")
      .send({ ...rest, targetAltitudeDeg: 60, moon: { illumination: 0.75, separationDeg: 45, altitudeDeg: 50 } });
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
    expect(res.body.skyMagPerArcsec2).toBeCloseTo(19.6681, 3);
    expect(res.body.sky.model).toMatch(/Krisciunas & Schaefer/);
    // airmass from the altitude: Kasten & Young (1989) at z = 30°, by hand,
    // 1 / (cos 30° + 0.50572 · 66.07995^−1.6364) = 1 / (0.866025 + 0.000532) = 1.15399
    expect(res.body.airmass).toBeCloseTo(1.15399, 4);
    // without the Moon: the band's dark sky
    const dark = await (await request()).post("/api/v1/exposure").send({ ...rest, airmass: 1.2 });
    expect(dark.body.skyMagPerArcsec2).toBe(21.6);
    const refused = await (await request()).post("/api/v1/exposure").send({ ...rest, airmass: 1.2, moon: { illumination: 2, separationDeg: 45, altitudeDeg: 50 } });
    expect(refused.status).toBe(400);
    expect(refused.body.issues[0]).toMatchObject({ path: "moon.illumination", message: "moon.illumination must be at most 1" });
    const both = await (await request()).post("/api/v1/exposure").send({ ...exposureBody, moon: { illumination: 0.5, separationDeg: 45, altitudeDeg: 50 } });
    expect(both.status).toBe(400);
    expect(both.body.issues.map((i: { path: string }) => i.path)).toContain("moon");
  });

  it("answers bad input with 400 and zod issues, never 500", async () => {
    const agent = await request();
    const bad: unknown[] = [
      {},
      { ...exposureBody, band: "Q" },
      { ...exposureBody, magnitude: "bright" },
      { ...exposureBody, snr: -1 },
      { ...exposureBody, exposureSeconds: 10 }, // both snr and exposureSeconds
      { ...exposureBody, snr: undefined }, // neither
      { ...exposureBody, airmass: 0.5 },
      { ...exposureBody, seeingArcsec: 0 },
      { ...exposureBody, moonCategory: "full" },
      { ...exposureBody, skyMagPerArcsec2: 21 }, // with moonCategory too
      { ...exposureBody, telescope: undefined },
      { ...exposureBody, telescope: { apertureM: -1, centralObstruction: 0.2 } },
      { ...exposureBody, instrument: { ...exposureBody.instrument, throughput: 1.5 } },
      { ...exposureBody, instrument: undefined, instrumentId: 999999 },
      { ...exposureBody, telescope: undefined, telescopeId: 999999 },
      [1, 2, 3],
      "just text",
    ];
    for (const body of bad) expectIssues(await agent.post("/api/v1/exposure").send(body as object), JSON.stringify(body));
    expectIssues(await agent.post("/api/v1/exposure").set("Content-Type", "application/json").send("{not json"), "malformed JSON");
  });
});

describe("POST /api/v1/astrometry", () => {
  const body = { raDeg: 84.2, decDeg: 18.5, epochs: ["2027-09-15", "2028-03-01", "2028-09-15", "2029-03-01", "2029-09-15"], positionalPrecisionMas: 3 };

  it("returns the precisions and parallax factors", async () => {
    const res = await (await request()).post("/api/v1/astrometry").send(body);
    expect(res.status).toBe(200);
    expect(res.body.properMotionPrecisionMasPerYr.ra).toBeGreaterThan(0);
    expect(res.body.parallaxPrecisionMas).toBeGreaterThan(0);
    expect(res.body.parallaxFactors).toHaveLength(5);
    expect(Object.keys(res.body.parallaxFactors[0]).sort()).toEqual(["date", "dec", "ra"]);
  });

  it("answers bad input with 400 and zod issues", async () => {
    const agent = await request();
    const bad: unknown[] = [
      {},
      { ...body, raDeg: 400 },
      { ...body, decDeg: "up" },
      { ...body, epochs: ["2027-01-01"] },
      { ...body, epochs: ["2027-13-01", "2027-01-01", "2028-01-01"] },
      { ...body, epochs: "2027-01-01" },
      { ...body, positionalPrecisionMas: 0 },
      { ...body, epochs: ["2027-01-01", "2027-01-01", "2027-01-01"] }, // degenerate
    ];
    for (const b of bad) expectIssues(await agent.post("/api/v1/astrometry").send(b as object), JSON.stringify(b));
  });
});

describe("POST /api/v1/epoch-plan", () => {
  const body = {
    site: { latitudeDeg: 31.3, longitudeDeg: -108.7, elevationM: 2100, timeZone: "America/Denver" },
    target: { ra: "05:36:48", dec: "+18:30:00" },
    firstDate: "2027-08-01",
    baselineYears: 2,
    epochs: 6,
    perEpochPrecisionMas: 4,
    maxAirmass: 1.6,
    secondsPerEpoch: 1200,
  };

  it("plans epochs and reports the precision, per semester", async () => {
    const res = await (await request()).post("/api/v1/epoch-plan").send(body);
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
    expect(res.body.epochs).toHaveLength(6);
    expect(res.body.precision.properMotionPrecisionMasPerYr.ra).toBeGreaterThan(0);
    expect(res.body.perSemester.length).toBeGreaterThan(1);
    const moved = await (await request()).post("/api/v1/epoch-plan").send({ ...body, movedEpochs: res.body.epochs.map((e: { date: string }) => e.date) });
    expect(moved.body.movedPrecision.properMotionPrecisionMasPerYr.ra).toBeGreaterThan(0);
  });

  it("answers bad input with 400 and zod issues", async () => {
    const agent = await request();
    const bad: unknown[] = [
      {},
      { ...body, site: undefined },
      { ...body, baselineYears: 20 },
      { ...body, epochs: 2 },
      { ...body, requiredProperMotionMasPerYr: 1 }, // with epochs too
      { ...body, epochs: undefined, requiredTangentialVelocityKmS: 5 }, // no distance
      { ...body, perEpochPrecisionMas: undefined },
      { ...body, target: { ra: "99:00:00", dec: "0" } },
      { ...body, site: { ...body.site, timeZone: "Nowhere/Else" } },
      { ...body, telescopeId: 999999, site: undefined },
    ];
    for (const b of bad) expectIssues(await agent.post("/api/v1/epoch-plan").send(b as object), JSON.stringify(b));
  });
});

describe("method and rate limit", () => {
  it("refuses the wrong method with 405", async () => {
    expect((await (await request()).get("/api/v1/exposure")).status).toBe(405);
  });

  // Last in the file: it uses up this address's minute (600 requests) and checks the 429.
  it("answers 429 JSON after 600 requests a minute from one address", async () => {
    const agent = await request();
    let limited: { status: number; body: { error?: string }; headers: Record<string, string> } | null = null;
    for (let i = 0; i < 700 && !limited; i++) {
      const res = await agent.post("/api/v1/astrometry").send({});
      if (res.status === 429) limited = res;
      else expect(res.status).toBe(400);
    }
    expect(limited).not.toBeNull();
    expect(limited!.body.error).toMatch(/600/);
    expect(Number(limited!.headers["retry-after"])).toBeGreaterThan(0);
  });
});
