// Visibility against an independent library: astropy 5.2.1 (Debian's python3-astropy), run by
// tests/fixtures/generate_visibility_reference.py into tests/fixtures/visibility-reference.json
// (settings stated in both: no IERS download, bundled IERS-B, builtin ephemeris, no refraction).
// Five invented sites from 8° S to 74° N over 366 nights from 2021-07-01 (crossing a year end),
// five invented targets (one with a large proper motion), limit 30° altitude.
//
// Tolerances, from the observed differences (all well under them) plus margin:
// - event times: 1 s where |latitude| < 50°, 3 s above — there the Sun meets the threshold at a
//   shallow angle, so the ~0.5″ difference between the two libraries' positions and astropy's
//   UT1−UTC from IERS-B (we take UTC as UT1, |DUT1| < 0.9 s) becomes seconds;
// - presence of every event and the number of windows: exact;
// - Moon's illuminated fraction 0.015 (astropy's ephemeris and the elongation form of the
//   phase angle), Moon altitude 0.1°, Moon–target separation 0.05°.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { z } from "zod";
import { prepareSiteNights, targetNights } from "./visibility";

// The 1.8 MB fixture is read at run time (importing it made tsc type the whole literal on every
// typecheck); its shape is checked here instead.
const isoOrNull = z.string().nullable();
const refNight = z.object({
  date: z.string(),
  sunset: isoOrNull,
  sunrise: isoOrNull,
  darkStart: isoOrNull,
  darkEnd: isoOrNull,
  moonIllumination: z.number(),
  moonAltitudeDeg: z.number(),
  targets: z.record(z.string(), z.object({ moonSeparationDeg: z.number(), windows: z.array(z.tuple([z.string(), z.string()])) })),
});
const referenceSchema = z.object({
  firstNight: z.string(),
  nights: z.number(),
  astropy: z.string(),
  targets: z.array(
    z.object({ id: z.string(), raDeg: z.number(), decDeg: z.number(), pmRaCosDecMasPerYr: z.number().optional(), pmDecMasPerYr: z.number().optional() }).strict(),
  ),
  sites: z.array(
    z.object({
      id: z.string(),
      latitudeDeg: z.number(),
      longitudeDeg: z.number(),
      elevationM: z.number(),
      timeZone: z.string(),
      nights: z.array(refNight),
    }),
  ),
});
const fixture = new URL("../../../tests/fixtures/visibility-reference.json", import.meta.url);
const ref = referenceSchema.parse(JSON.parse(readFileSync(fixture, "utf8")));

const ms = (s: string | null) => (s === null ? null : Date.parse(s));

describe(`visibility against astropy ${ref.astropy} (committed fixture)`, () => {
  it("covers low, mid and high latitudes in both hemispheres, across a year boundary", () => {
    const lats = ref.sites.map((s) => s.latitudeDeg);
    expect(Math.min(...lats)).toBeLessThan(-30);
    expect(Math.max(...lats)).toBeGreaterThan(66.6);
    expect(ref.sites[0].nights.some((n) => n.date === "2021-12-31")).toBe(true);
    expect(ref.sites[0].nights.some((n) => n.date === "2022-01-01")).toBe(true);
  });

  for (const site of ref.sites) {
    it(`${site.id} (${site.latitudeDeg}°): twilight, sunset/sunrise, windows and Moon over ${ref.nights} nights`, () => {
      const tol = Math.abs(site.latitudeDeg) < 50 ? 1000 : 3000;
      const prepared = prepareSiteNights(site, ref.firstNight, ref.nights);
      const rows = ref.targets.map((t) => targetNights(prepared, t, 30));
      let compared = 0;
      for (let i = 0; i < ref.nights; i++) {
        const a = site.nights[i];
        const n = prepared.nights[i];
        expect(n.date).toBe(a.date);
        const pairs: [string, number | null, number | null][] = [
          ["sunset", n.sunset, ms(a.sunset)],
          ["sunrise", n.sunrise, ms(a.sunrise)],
          ["darkStart", n.darkStart, ms(a.darkStart)],
          ["darkEnd", n.darkEnd, ms(a.darkEnd)],
        ];
        for (const [name, ours, theirs] of pairs) {
          expect(ours === null, `${a.date} ${name} presence`).toBe(theirs === null);
          if (ours !== null && theirs !== null) {
            expect(Math.abs(ours - theirs), `${a.date} ${name}`).toBeLessThan(tol);
            compared++;
          }
        }
        expect(Math.abs(n.moonIllumination - a.moonIllumination), `${a.date} moon illumination`).toBeLessThan(0.015);
        expect(Math.abs(n.moonAltitudeDeg - a.moonAltitudeDeg), `${a.date} moon altitude`).toBeLessThan(0.1);
        ref.targets.forEach((t, k) => {
          const ours = rows[k][i];
          const theirs = a.targets[t.id];
          expect(Math.abs(ours.moonSeparationDeg - theirs.moonSeparationDeg), `${a.date} ${t.id} separation`).toBeLessThan(0.05);
          expect(ours.windows.length, `${a.date} ${t.id} windows`).toBe(theirs.windows.length);
          theirs.windows.forEach(([s, e], j) => {
            expect(Math.abs(ours.windows[j].start - Date.parse(s)), `${a.date} ${t.id} start`).toBeLessThan(tol);
            expect(Math.abs(ours.windows[j].end - Date.parse(e)), `${a.date} ${t.id} end`).toBeLessThan(tol);
            compared += 2;
          });
        });
      }
      expect(compared).toBeGreaterThan(600);
    });
  }
});
