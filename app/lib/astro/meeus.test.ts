// Checks against worked examples of Meeus, Astronomical Algorithms, 2nd ed. (1998). The book's
// printed values are typed from memory of the examples; each is also cross-checked against
// `astronomia` (an independent implementation of Meeus's algorithms) where it has the function.
import * as Astro from "astronomy-engine";
import { sidereal, julian, moonillum, base } from "astronomia";
import { describe, expect, it } from "vitest";
import { horizontalFromHourAngle } from "./coordinates";
import { hourAngleAtAltitude, moonIllumination } from "./visibility";

const hms = (h: number, m: number, s: number) => h + m / 60 + s / 3600;

describe("sidereal time (astronomy-engine's GAST, which the visibility module uses)", () => {
  it("example 12.a: 1987 April 10, 0h UT — mean 13h10m46.3668s, apparent 13h10m46.1351s", () => {
    const t = new Date(Date.UTC(1987, 3, 10, 0, 0, 0));
    const gast = Astro.SiderealTime(t);
    // tolerance 0.02 s of time: IAU 2006 sidereal time and truncated nutation vs Meeus's IAU 1982 formulas
    expect(Math.abs(gast - hms(13, 10, 46.1351)) * 3600).toBeLessThan(0.02);
    const jd = julian.CalendarGregorianToJD(1987, 4, 10);
    expect(Math.abs(sidereal.mean(jd) - hms(13, 10, 46.3668) * 3600)).toBeLessThan(0.001); // astronomia: seconds
    expect(Math.abs(sidereal.apparent(jd) / 3600 - gast) * 3600).toBeLessThan(0.02);
  });

  it("example 12.b: 1987 April 10, 19h21m00s UT — mean 8h34m57.0896s", () => {
    const jd = julian.CalendarGregorianToJD(1987, 4, 10 + hms(19, 21, 0) / 24);
    expect(Math.abs(sidereal.mean(jd) - hms(8, 34, 57.0896) * 3600)).toBeLessThan(0.001);
    const gast = Astro.SiderealTime(new Date(Date.UTC(1987, 3, 10, 19, 21, 0)));
    // apparent = mean + equation of the equinoxes (−0.2317 s on that date, example 12.a)
    expect(Math.abs(gast * 3600 - (hms(8, 34, 57.0896) * 3600 - 0.2317))).toBeLessThan(0.02);
  });

  it("agrees with astronomia's apparent sidereal time over 1990–2040 within 0.05 s", () => {
    for (let year = 1990; year <= 2040; year += 5) {
      const ms = Date.UTC(year, 5, 17, 3, 14, 15);
      const jd = ms / 86400e3 + 2440587.5;
      const diff = ((Astro.SiderealTime(new Date(ms)) * 3600 - sidereal.apparent(jd) + 43200) % 86400 + 86400) % 86400 - 43200;
      expect(Math.abs(diff), String(year)).toBeLessThan(0.05);
    }
  });
});

describe("horizontal coordinates, example 13.b (Venus from Washington, 1987 April 10, 19h21m UT)", () => {
  it("h = 15.1249°, A = 68.0337° from south (book values)", () => {
    const lat = 38 + 55 / 60 + 17 / 3600;
    const lonWest = 77 + 3 / 60 + 56 / 3600;
    const ra = 15 * hms(23, 9, 16.641);
    const dec = -(6 + 43 / 60 + 11.61 / 3600);
    const theta0 = 15 * hms(8, 34, 56.853); // apparent sidereal time at Greenwich, from the example
    const H = theta0 - lonWest - ra;
    const h = horizontalFromHourAngle(lat, H, dec);
    // tolerance 0.0002° (0.7″): the book's inputs are rounded to 0.001 s and 0.01″
    expect(Math.abs(h.altitudeDeg - 15.1249)).toBeLessThan(0.0002);
    expect(Math.abs(((h.azimuthDeg + 180) % 360) - 68.0337)).toBeLessThan(0.0002);
  });
});

describe("rising and setting, example 15.a (Venus at Boston, 1988 March 20)", () => {
  it("cos H0 formula: H0 = 108.5344° for φ = +42°20′, δ = 18.44092°, h0 = −0°34′ (book value)", () => {
    expect(hourAngleAtAltitude(42 + 20 / 60, 18.44092, -0.5667)).toBeCloseTo(108.5344, 3);
  });

  it("rising 12h25m UT and setting 2h55m UT (book, to the minute) via astronomy-engine's search", () => {
    const boston = new Astro.Observer(42 + 20 / 60, -(71 + 5 / 60), 0);
    const day = new Date(Date.UTC(1988, 2, 20));
    const rise = Astro.SearchRiseSet(Astro.Body.Venus, boston, +1, day, 1)!.date.getTime();
    const set = Astro.SearchRiseSet(Astro.Body.Venus, boston, -1, day, 1)!.date.getTime();
    // tolerance 1.5 min: the book rounds to the minute and uses its own ΔT and interpolation
    expect(Math.abs(rise - Date.UTC(1988, 2, 20, 12, 25))).toBeLessThan(90_000);
    expect(Math.abs(set - Date.UTC(1988, 2, 20, 2, 55))).toBeLessThan(90_000);
  });
});

describe("Moon's illuminated fraction, example 48.a (1992 April 12, 0h TD)", () => {
  it("k = 0.6786 (book value)", () => {
    const t = Date.UTC(1992, 3, 12, 0, 0, 0) - 59_000; // 0h TD = 0h UT + ~59 s (ΔT in 1992)
    expect(moonIllumination(t)).toBeCloseTo(0.6786, 3);
    // astronomia's low-precision phase angle (Meeus 48.4) as a second opinion, within 0.005
    const jde = julian.CalendarGregorianToJD(1992, 4, 12);
    expect(Math.abs(base.illuminated(moonillum.phaseAngle3(jde)) - 0.6786)).toBeLessThan(0.005);
  });
});
