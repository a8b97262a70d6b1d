import { describe, expect, it } from "vitest";
import { ksAirmass, magFromNanoLamberts, moonIlluminance, moonlitSky, nanoLambertsFromMag, phaseAngleDeg, scatteringFunction } from "./moonlight";

// Check values: Krisciunas & Schaefer (1991, PASP 103, 1033), the equations written out by hand
// in Python (not with this module), step by step in nanoLamberts. k = 0.172 mag/airmass and a
// dark zenith sky of V = 21.587 mag/arcsec² are the Mauna Kea values the paper works with (from
// memory). Equation numbers as we remember them: eq. 1 (nL ↔ mag), eq. 2 (dark sky at Z),
// eq. 3 (air mass), eq. 15 (moonlight), eqs. 16–18/21 (scattering, Rayleigh + Mie), eq. 19
// (Mie for ρ < 10°), eq. 20 (the Moon's illuminance from the phase angle).
//
// Case A: α = 60° (illuminated fraction 0.75), ρ = 45°, Moon at altitude 50° (Z_moon = 40°),
// target at altitude 60° (Z = 30°):
//   X(30°) = (1 − 0.96 sin² 30°)^−½ = 1.147079;  X(40°) = 1.287404                     (eq. 3)
//   I* = 10^(−0.4 (3.84 + 0.026·60 + 4e−9·60⁴)) = 6.595747e−3                          (eq. 20)
//   f_R = 10^5.36 (1.06 + cos² 45°) = 357375.35;  f_M = 10^(6.15 − 45/40) = 105925.37    (eqs. 16–18)
//   B_moon = f · I* · 10^(−0.4·0.172·1.287404) · (1 − 10^(−0.4·0.172·1.147079)) = 414.084 nL (eq. 15)
//   B_zen = 34.08 exp(20.7233 − 0.92104 · 21.587) = 79.006 nL                          (eq. 1)
//   B_dark(30°) = 79.006 · 10^(−0.4·0.172·0.147079) · 1.147079 = 88.539 nL               (eq. 2)
//   V = (20.7233 − ln((414.084 + 88.539)/34.08)) / 0.92104 = 19.5781 mag/arcsec²        (eq. 1)
//   dark alone 21.4633, moonlight alone 19.7884
// Case B: α = 10°, ρ = 8° (eq. 19: f_M = 6.2e7/8² = 968750), Z_moon = 60°, Z = 45°:
//   X = 1.386750, X_moon = 1.889822, I* = 2.290783e−2, f_R = 467481.52,
//   B_moon = 4810.164 nL, B_dark = 103.050 nL, V = 17.1028 mag/arcsec²
describe("Krisciunas & Schaefer (1991) moonlight model", () => {
  it("reproduces each intermediate term of case A", () => {
    expect(ksAirmass(30)).toBeCloseTo(1.147079, 6);
    expect(ksAirmass(40)).toBeCloseTo(1.287404, 6);
    expect(phaseAngleDeg(0.75)).toBeCloseTo(60, 9);
    expect(moonIlluminance(60)).toBeCloseTo(6.595747e-3, 9);
    expect(scatteringFunction(45)).toBeCloseTo(357375.35 + 105925.37, 1);
    expect(nanoLambertsFromMag(21.587)).toBeCloseTo(79.006, 3);
    expect(magFromNanoLamberts(79.006)).toBeCloseTo(21.587, 4);
  });

  it("case A: 75 % Moon 45° away gives V = 19.578 at altitude 60°", () => {
    const r = moonlitSky({ band: "V", darkZenithMag: 21.587, extinctionMagPerAirmass: 0.172, moon: { illumination: 0.75, separationDeg: 45, altitudeDeg: 50 }, targetAltitudeDeg: 60 });
    expect(r.terms.moonNanoLamberts).toBeCloseTo(414.084, 2);
    expect(r.terms.darkNanoLamberts).toBeCloseTo(88.539, 2);
    expect(r.skyMagPerArcsec2).toBeCloseTo(19.5781, 3);
    expect(r.darkSkyMagPerArcsec2).toBeCloseTo(21.4633, 3);
    expect(r.moonlightMagPerArcsec2).toBeCloseTo(19.7884, 3);
  });

  it("case B: nearly full Moon 8° away uses the small-angle Mie term and gives V = 17.103", () => {
    const r = moonlitSky({ band: "V", darkZenithMag: 21.587, extinctionMagPerAirmass: 0.172, moon: { illumination: (1 + Math.cos((10 * Math.PI) / 180)) / 2, separationDeg: 8, altitudeDeg: 30 }, targetAltitudeDeg: 45 });
    expect(r.terms.scattering).toBeCloseTo(467481.52 + 968750, 0);
    expect(r.terms.moonNanoLamberts).toBeCloseTo(4810.164, 1);
    expect(r.skyMagPerArcsec2).toBeCloseTo(17.1028, 3);
  });

  it("adds nothing with the Moon below the horizon; other bands shift by the Sun's colour only in the moonlight", () => {
    const down = moonlitSky({ band: "V", darkZenithMag: 21.587, extinctionMagPerAirmass: 0.172, moon: { illumination: 1, separationDeg: 90, altitudeDeg: -5 }, targetAltitudeDeg: 90 });
    expect(down.moonlightMagPerArcsec2).toBeNull();
    expect(down.skyMagPerArcsec2).toBeCloseTo(21.587, 9); // eq. 2 at Z = 0 is the zenith value
    const b = moonlitSky({ band: "B", darkZenithMag: 22.6, extinctionMagPerAirmass: 0.172, moon: { illumination: 0.75, separationDeg: 45, altitudeDeg: 50 }, targetAltitudeDeg: 60 });
    // moonlight in B = the V moonlight of case A + (B − V)_sun = 19.7884 + 0.65 (same k)
    expect(b.moonlightMagPerArcsec2).toBeCloseTo(19.7884 + 0.65, 3);
  });
});
