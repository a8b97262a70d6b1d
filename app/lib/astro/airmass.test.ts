import { describe, expect, it } from "vitest";
import { airmass, airmassKastenYoung, airmassPickering, altitudeForAirmass } from "./airmass";

/**
 * Kasten & Young (1989), Applied Optics 28, 4735, eq. 3, written out here independently of
 * `airmass.ts`: X = 1 / (sin h + a·(h + b)^−c), h the altitude in degrees,
 * a = 0.50572, b = 6.07995°, c = 1.6364.
 */
function kastenYoung1989(altitudeDeg: number) {
  return 1 / (Math.sin((altitudeDeg * Math.PI) / 180) + 0.50572 * (altitudeDeg + 6.07995) ** -1.6364);
}

describe("airmass", () => {
  it("matches relative air masses of the standard atmosphere (Kasten & Young 1989 table, values from memory)", () => {
    // zenith angle (deg) → tabulated air mass; the formula is a fit to this table good to ~0.5 %
    // except near the horizon. From memory of the published table (treat the last digit as ±1);
    // a remembered 19.8 at z = 88° disagreed with the formula by 1.9 % and was dropped as unsure.
    const table: [number, number][] = [
      [0, 1.0],
      [60, 1.995],
      [70, 2.904],
      [75, 3.816],
      [80, 5.6],
      [85, 10.4],
    ];
    for (const [z, x] of table) expect(Math.abs(airmassKastenYoung(90 - z) / x - 1), `z=${z}`).toBeLessThan(0.01);
    // horizon: table 38.09 (from memory); the published fit itself, evaluated here apart from the code
    expect(airmassKastenYoung(0)).toBeCloseTo(kastenYoung1989(0), 6);
    expect(Math.abs(airmassKastenYoung(0) / 38.09 - 1)).toBeLessThan(0.01);
  });

  it("approaches sec z near the zenith (plane-parallel atmosphere, a textbook limit)", () => {
    for (const z of [0, 10, 20, 30, 40]) {
      const sec = 1 / Math.cos((z * Math.PI) / 180);
      expect(Math.abs(airmass(90 - z) / sec - 1)).toBeLessThan(0.003);
    }
  });

  it("agrees with Pickering (2002) within 1 % above 15° altitude", () => {
    for (const h of [15, 20, 30, 45, 60, 90]) expect(Math.abs(airmassKastenYoung(h) / airmassPickering(h) - 1)).toBeLessThan(0.01);
  });

  it("inverts: altitude for an air mass", () => {
    for (const x of [1.0, 1.2, 1.5, 2, 3]) expect(airmass(altitudeForAirmass(x))).toBeCloseTo(Math.max(x, airmass(90)), 8);
    // sec z = 2 at z = 60°; the curved atmosphere needs slightly less altitude (table: X(60°) = 1.995)
    expect(altitudeForAirmass(2)).toBeLessThan(30);
    expect(altitudeForAirmass(2)).toBeGreaterThan(29.9);
    expect(altitudeForAirmass(0.5)).toBe(90);
    expect(altitudeForAirmass(100)).toBe(0);
  });

  it("is infinite below the horizon", () => {
    expect(airmass(-1)).toBe(Infinity);
  });
});
