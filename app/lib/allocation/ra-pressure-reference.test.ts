// Available dark hours per LST bin against an independent library: astropy 5.2.1 (Debian's
// python3-astropy), run by tests/fixtures/generate_ra_pressure_reference.py into
// tests/fixtures/ra-pressure-reference.json (settings stated in both: no IERS download, bundled
// IERS-B, builtin ephemeris, no refraction, astropy's apparent sidereal time). Two invented sites,
// 27° S and 48° N, 45 nights from 2022-03-20 (a full lunar cycle and more).
// Tolerance: 0.05 h per bin (issue 12), for the total and for each moon category.
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { z } from "zod";
import { darkHoursByMoon, ensureMoonTimes, moonCategory, prepareSiteNights } from "../astro/visibility";
import { raPressure } from "./ra-pressure";

const hours = z.object({ dark: z.number(), grey: z.number(), bright: z.number() });
const referenceSchema = z.object({
  astropy: z.string(),
  firstNight: z.string(),
  nights: z.number(),
  sites: z.array(
    z.object({
      id: z.string(),
      latitudeDeg: z.number(),
      longitudeDeg: z.number(),
      elevationM: z.number(),
      timeZone: z.string(),
      darkHours: z.number(),
      nights: z.array(z.object({ date: z.string(), darkHours: z.number(), moonIllumination: z.number(), pieces: z.array(z.object({ category: z.enum(["dark", "grey", "bright"]) })) })),
      bins: z.array(z.object({ lstHour: z.number(), darkHours: z.number(), byMoonCategory: hours })).length(24),
    }),
  ),
});
const ref = referenceSchema.parse(JSON.parse(readFileSync(new URL("../../../tests/fixtures/ra-pressure-reference.json", import.meta.url), "utf8")));

describe(`RA pressure's available dark hours against astropy ${ref.astropy} (committed fixture)`, () => {
  it("covers both hemispheres and a whole lunar cycle", () => {
    expect(ref.sites.some((s) => s.latitudeDeg < -20)).toBe(true);
    expect(ref.sites.some((s) => s.latitudeDeg > 40)).toBe(true);
    expect(ref.nights).toBeGreaterThanOrEqual(30);
  });

  for (const site of ref.sites) {
    it(`${site.id} (${site.latitudeDeg}°): dark hours per LST bin and moon category within 0.05 h`, () => {
      const prepared = prepareSiteNights(site, ref.firstNight, ref.nights);
      ensureMoonTimes(prepared);
      // the nights' moon categories agree, so the split compares like with like
      expect(prepared.nights.map((n) => moonCategory(n.moonIllumination))).toEqual(
        site.nights.map((n) => (n.moonIllumination < 0.35 ? "dark" : n.moonIllumination < 0.7 ? "grey" : "bright")),
      );
      const result = raPressure({ prepared, clearFractions: [], observations: [] });
      let worst = 0;
      for (const [k, theirs] of site.bins.entries()) {
        const ours = result.bins[k];
        expect(ours.raHour).toBe(theirs.lstHour);
        expect(Math.abs(ours.darkHours - theirs.darkHours), `bin ${k}`).toBeLessThan(0.05);
        for (const c of ["dark", "grey", "bright"] as const) {
          expect(Math.abs(ours.byMoonCategory[c].darkHours - theirs.byMoonCategory[c]), `bin ${k} ${c}`).toBeLessThan(0.05);
          worst = Math.max(worst, Math.abs(ours.byMoonCategory[c].darkHours - theirs.byMoonCategory[c]));
        }
      }
      // the bins sum to the semester's dark hours, ours and astropy's
      expect(result.bins.reduce((s, b) => s + b.darkHours, 0)).toBeCloseTo(result.darkHours, 9);
      expect(Math.abs(result.darkHours - site.darkHours)).toBeLessThan(0.05);
      // and the moon split sums to the visibility module's own split of each dark interval
      for (const c of ["dark", "grey", "bright"] as const) {
        const own = prepared.nights.reduce((s, n) => s + darkHoursByMoon(n)[c], 0);
        expect(result.bins.reduce((s, b) => s + b.byMoonCategory[c].darkHours, 0)).toBeCloseTo(own, 9);
      }
      // the fixture has something in every category at this site
      for (const c of ["dark", "grey", "bright"] as const) expect(site.bins.reduce((s, b) => s + b.byMoonCategory[c], 0)).toBeGreaterThan(10);
      console.log(`${site.id}: worst bin difference ${(worst * 60).toFixed(2)} min`);
    });
  }
});
