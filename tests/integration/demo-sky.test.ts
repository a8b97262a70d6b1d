// Invented objects lie in empty sky: every demo and test target at least 1° from every Messier
// object, every NGC/IC object brighter than magnitude 10 and every star brighter than V = 5.
// The catalogue: the data files of the npm package d3-celestial 0.7.35 (BSD-3-Clause) —
// data/messier.json (the 110 Messier objects), data/dsos.14.json (deep-sky objects to magnitude
// 14, of which we take NGC and IC entries to magnitude 10) and data/stars.6.json (stars to
// magnitude 6 from the Hipparcos catalogue, of which we take those brighter than 5). Demo targets
// are checked at their RA and at RA + 12 h (the seeder turns them by 12 h for the other half of
// the year). None of this depends on the code under test.
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { demoProposals } from "../../sequelize/seeders/20261201000300-demo-proposals";
import { surveyFields } from "../../sequelize/demo-survey";
import { distributedDemoTargets } from "../../sequelize/seeders/20261202090600-demo-distributed";

type Point = { name: string; ra: number; dec: number };
type Feature = { id: string | number; properties: { mag?: number | string }; geometry: { coordinates: [number, number] } };

const dataDir = path.join(path.dirname(createRequire(import.meta.url).resolve("d3-celestial/package.json")), "data");
const load = (file: string): Feature[] => JSON.parse(readFileSync(path.join(dataDir, file), "utf8")).features;
const point = (name: string, f: Feature): Point => ({ name, ra: (f.geometry.coordinates[0] + 360) % 360, dec: f.geometry.coordinates[1] });

const messier = load("messier.json").map((f) => point(String(f.id), f));
const ngc = load("dsos.14.json")
  .filter((f) => /^(NGC|IC)/.test(String(f.id)) && Number(f.properties.mag) <= 10)
  .map((f) => point(String(f.id), f));
const brightStars = load("stars.6.json")
  .filter((f) => Number(f.properties.mag) < 5)
  .map((f) => point(`HIP ${f.id}`, f));
const catalogue = [...messier, ...ngc, ...brightStars];

const rad = Math.PI / 180;
function separationDeg(a: Point, b: Point) {
  const c = Math.sin(a.dec * rad) * Math.sin(b.dec * rad) + Math.cos(a.dec * rad) * Math.cos(b.dec * rad) * Math.cos((a.ra - b.ra) * rad);
  return Math.acos(Math.min(1, Math.max(-1, c))) / rad;
}
function tooClose(p: Point) {
  return catalogue.filter((o) => separationDeg(p, o) < 1).map((o) => `${p.name} (${p.ra.toFixed(2)}, ${p.dec.toFixed(2)}) is ${separationDeg(p, o).toFixed(2)}° from ${o.name}`);
}

// The invented targets of the astropy reference fixture (app/lib/astro/visibility-reference.test.ts).
type FixtureTarget = { id: string; raDeg: number; decDeg: number; pmRaCosDecMasPerYr?: number; pmDecMasPerYr?: number };
const fixtureTargets: FixtureTarget[] = JSON.parse(
  readFileSync(new URL("../fixtures/visibility-reference.json", import.meta.url), "utf8"),
).targets;

const turned = (p: Point): Point => ({ ...p, name: `${p.name} turned by 12 h`, ra: (p.ra + 180) % 360 });
const seedTargets: Point[] = [
  ...demoProposals.flatMap((d) => d.targets.map((t) => ({ name: t.name, ra: t.ra, dec: t.dec }))),
  ...distributedDemoTargets,
];

// Invented targets in the tests and the sky tools' defaults (hand-copied; update with them).
const exampleTargets: Point[] = [
  { name: "Hollowmere Field 1 / Brackfell A (13:05:20 +22:10:00)", ra: 196.3333, dec: 22.1667 },
  { name: "Brackfell B (13:06:02.5 +22:14:30)", ra: 196.5104, dec: 22.2417 },
  { name: "Brackfell C (13:07:00 +25:00:00)", ra: 196.75, dec: 25 },
  { name: "Lantern Field", ra: 196.3, dec: 22.2 },
  { name: "Forgotten Field", ra: 200, dec: 20 },
  { name: "Vesper Knot (05:12:33.4 −21:04:12)", ra: 78.1392, dec: -21.07 },
  { name: "Sky tools default field (05:36:48 +18:30:00)", ra: 84.2, dec: 18.5 },
  { name: "Deepwell Field (20:40:00 −78:00:00), ra-pressure.test.ts", ra: 310, dec: -78 },
];

// Famous high-proper-motion stars (J2000 position in degrees, μα*, μδ in mas/yr), from memory.
const famousMovers = [
  { name: "Barnard's Star", ra: 269.45, dec: 4.69, pmRa: -798, pmDec: 10328 },
  { name: "Kapteyn's Star", ra: 77.92, dec: -45.02, pmRa: 6506, pmDec: -5732 },
  { name: "Lalande 21185", ra: 165.83, dec: 35.97, pmRa: -580, pmDec: -4770 },
  { name: "Groombridge 1830", ra: 178.24, dec: 37.72, pmRa: 4003, pmDec: -5814 },
  { name: "61 Cygni A", ra: 316.72, dec: 38.75, pmRa: 4168, pmDec: 3269 },
  { name: "Wolf 359", ra: 164.12, dec: 7.01, pmRa: -3842, pmDec: -2725 },
  { name: "Luyten's Star", ra: 111.85, dec: 5.23, pmRa: 571, pmDec: -3694 },
  { name: "Van Maanen's Star", ra: 12.29, dec: 5.39, pmRa: 1231, pmDec: -2712 },
  { name: "Ross 128", ra: 176.94, dec: 0.8, pmRa: 607, pmDec: -1223 },
  { name: "Groombridge 34", ra: 4.6, dec: 44.02, pmRa: 2892, pmDec: 411 },
  { name: "40 Eridani A", ra: 63.82, dec: -7.65, pmRa: -2240, pmDec: -3420 },
  { name: "ε Indi", ra: 330.84, dec: -56.79, pmRa: 3961, pmDec: -2539 },
  { name: "Teegarden's Star", ra: 43.25, dec: 16.88, pmRa: 3430, pmDec: -3810 },
  { name: "Lacaille 9352", ra: 346.47, dec: -35.85, pmRa: 6768, pmDec: 1328 },
  { name: "Gliese 1", ra: 1.38, dec: -37.36, pmRa: 5634, pmDec: -2337 },
  { name: "μ Cassiopeiae", ra: 17.07, dec: 54.92, pmRa: 3422, pmDec: -1599 },
];

describe("invented targets lie in empty sky (d3-celestial's Messier, NGC/IC and Hipparcos lists)", () => {
  it("the catalogue is the one we think it is", () => {
    expect(messier).toHaveLength(110);
    // M31 and Sirius (α CMa, HIP 32349) are where every atlas has them
    expect(separationDeg(messier.find((m) => m.name === "M31")!, { name: "M31", ra: 10.68, dec: 41.27 })).toBeLessThan(0.1);
    expect(separationDeg(brightStars.find((s) => s.name === "HIP 32349")!, { name: "Sirius", ra: 101.29, dec: -16.72 })).toBeLessThan(0.1);
    expect(brightStars.length).toBeGreaterThan(1500);
    expect(ngc.length).toBeGreaterThan(300);
  });

  it("every demo proposal target, at its RA and turned by 12 h", () => {
    expect(seedTargets.length).toBeGreaterThan(30);
    expect(seedTargets.flatMap((t) => [...tooClose(t), ...tooClose(turned(t))])).toEqual([]);
  });

  it("every field of the 500-field survey, at its RA and turned by 12 h", () => {
    const fields = surveyFields();
    expect(fields).toHaveLength(500);
    expect(new Set(fields.map((f) => f.name)).size).toBe(500);
    expect(fields.flatMap((t) => [...tooClose(t), ...tooClose(turned(t))])).toEqual([]);
  });

  it("the invented targets of the tests and the sky tools' defaults", () => {
    expect(exampleTargets.flatMap(tooClose)).toEqual([]);
  });

  it("the targets of the astropy visibility fixture", () => {
    expect(fixtureTargets.map((t) => t.id)).toEqual(["t1", "t2", "t3", "t4", "t5"]);
    expect(fixtureTargets.flatMap((t) => tooClose({ name: `fixture ${t.id}`, ra: t.raDeg, dec: t.decDeg }))).toEqual([]);
  });

  it("the fast-moving fixture star neither sits beside nor moves like a famous high-proper-motion star", () => {
    const movers = fixtureTargets.filter((t) => t.pmRaCosDecMasPerYr !== undefined || t.pmDecMasPerYr !== undefined);
    expect(movers.map((t) => t.id)).toEqual(["t5"]);
    for (const t of movers) {
      const pmRa = t.pmRaCosDecMasPerYr ?? 0;
      const pmDec = t.pmDecMasPerYr ?? 0;
      for (const f of famousMovers) {
        expect(separationDeg({ name: t.id, ra: t.raDeg, dec: t.decDeg }, f), `${t.id} near ${f.name}`).toBeGreaterThan(1);
        // a motion within 400 mas/yr of a famous star's would read as that star's
        expect(Math.hypot(pmRa - f.pmRa, pmDec - f.pmDec), `${t.id} moves like ${f.name}`).toBeGreaterThan(400);
      }
    }
  });

  it("no invented star moves like, or sits beside, a famous high-proper-motion star", () => {
    const stars = demoProposals.flatMap((d) => d.targets).filter((t) => t.pmRa !== undefined || t.pmDec !== undefined);
    for (const t of stars) {
      expect(Math.hypot(t.pmRa ?? 0, t.pmDec ?? 0), t.name).toBeLessThan(400);
      for (const f of famousMovers) {
        for (const p of [t, turned({ name: t.name, ra: t.ra, dec: t.dec })]) expect(separationDeg({ name: t.name, ra: p.ra, dec: p.dec }, f), `${t.name} near ${f.name}`).toBeGreaterThan(1);
      }
    }
  });
});
