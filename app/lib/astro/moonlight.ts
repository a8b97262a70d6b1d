// Sky brightness with the Moon up: Krisciunas & Schaefer (1991), "A model of the brightness of
// moonlight", PASP 103, 1033 (equation numbers as we remember them from the paper):
//
//   eq. 1   B(nL) = 34.08 exp(20.7233 − 0.92104 V)              V in mag/arcsec², B in nanoLamberts
//   eq. 2   B_dark(Z) = B_zen · 10^(−0.4 k (X(Z) − 1)) · X(Z)   dark sky away from the zenith
//   eq. 3   X(Z) = (1 − 0.96 sin² Z)^(−1/2)                     the model's own air mass
//   eq. 15  B_moon = f(ρ) · I* · 10^(−0.4 k X(Z_moon)) · [1 − 10^(−0.4 k X(Z))]
//   eq. 16–18, 21  f(ρ) = 10^5.36 (1.06 + cos² ρ) + 10^(6.15 − ρ/40)   Rayleigh + Mie scattering, ρ in degrees
//   eq. 19  f_M = 6.2 × 10^7 ρ^(−2) in place of the Mie term for ρ < 10°
//   eq. 20  I* = 10^(−0.4 (3.84 + 0.026 |α| + 4 × 10^−9 α⁴))   the Moon's illuminance, α the phase angle in degrees
//
// Inputs: the Moon's illuminated fraction k_ill (α = arccos(2 k_ill − 1), the inverse of
// k = (1 + cos α)/2, Meeus 48.1), the Moon–target separation ρ, the Moon's and target's
// zenith distances and the extinction coefficient k. The moonlight is added in flux to the
// band's dark sky, itself carried from the zenith to Z by eq. 2.
//
// The paper's model is fitted in V. For the other bands we shift the V result by the Sun's colour
// (moonlight is sunlight): X − V = U +0.82, B +0.65, R −0.36, I −0.70 (solar colours, from memory
// of Holmberg et al. 2006 / Ramírez et al. 2012) and use the band's own extinction coefficient.
// That is an approximation: Rayleigh scattering makes moonlit sky bluer than the Sun.

import type { Band } from "./bands";

const DEG = Math.PI / 180;

/** Colour of sunlight, band − V (mag); see the note above. */
export const SUN_COLOUR_MINUS_V: Record<Band, number> = { U: 0.82, B: 0.65, V: 0, R: -0.36, I: -0.7 };

export const MOONLIGHT_MODEL =
  "Krisciunas & Schaefer (1991, PASP 103, 1033), eqs. 1–3, 15–21: moonlight from the phase angle, the Moon–target separation, both zenith distances and the extinction coefficient, added in flux to the band's dark sky (V model; other bands shifted by the Sun's colour)";

/** eq. 1: nanoLamberts from V mag/arcsec². */
export function nanoLambertsFromMag(mag: number): number {
  return 34.08 * Math.exp(20.7233 - 0.92104 * mag);
}

/** eq. 1 inverted. */
export function magFromNanoLamberts(b: number): number {
  return (20.7233 - Math.log(b / 34.08)) / 0.92104;
}

/** eq. 3 (zenith distance in degrees). */
export function ksAirmass(zenithDeg: number): number {
  const s = Math.sin(zenithDeg * DEG);
  return 1 / Math.sqrt(1 - 0.96 * s * s);
}

/** Phase angle (deg) from the illuminated fraction, inverting k = (1 + cos α)/2. */
export function phaseAngleDeg(illumination: number): number {
  return Math.acos(Math.max(-1, Math.min(1, 2 * illumination - 1))) / DEG;
}

/** eq. 20: the Moon's illuminance (in the paper's units, foot-candles) at phase angle α (deg). */
export function moonIlluminance(alphaDeg: number): number {
  const a = Math.abs(alphaDeg);
  return 10 ** (-0.4 * (3.84 + 0.026 * a + 4e-9 * a ** 4));
}

/** eqs. 16–21: the scattering function at separation ρ (deg). */
export function scatteringFunction(rhoDeg: number): number {
  const c = Math.cos(rhoDeg * DEG);
  const rayleigh = 10 ** 5.36 * (1.06 + c * c);
  const mie = rhoDeg < 10 ? 6.2e7 / Math.max(rhoDeg, 0.25) ** 2 : 10 ** (6.15 - rhoDeg / 40);
  return rayleigh + mie;
}

export type MoonlightInput = {
  band: Band;
  /** dark-sky brightness of the band at the zenith (mag/arcsec²) */
  darkZenithMag: number;
  /** extinction coefficient of the band (mag per air mass) */
  extinctionMagPerAirmass: number;
  moon: { illumination: number; separationDeg: number; altitudeDeg: number };
  targetAltitudeDeg: number;
};

export type MoonlightResult = {
  /** the sky at the target: dark sky at its zenith distance plus moonlight (mag/arcsec²) */
  skyMagPerArcsec2: number;
  /** dark sky carried to the target's zenith distance (eq. 2) */
  darkSkyMagPerArcsec2: number;
  /** moonlight alone (mag/arcsec²); null with the Moon below the horizon */
  moonlightMagPerArcsec2: number | null;
  /** V-band intermediate numbers, for a reviewer to check */
  terms: { phaseAngleDeg: number; illuminance: number; scattering: number; airmassTarget: number; airmassMoon: number | null; moonNanoLamberts: number; darkNanoLamberts: number };
};

export function moonlitSky(input: MoonlightInput): MoonlightResult {
  const k = input.extinctionMagPerAirmass;
  const z = 90 - input.targetAltitudeDeg;
  const X = ksAirmass(z);
  const colour = SUN_COLOUR_MINUS_V[input.band];
  // Work in V-equivalent nanoLamberts: the band's dark sky shifted into V by the same colour,
  // so that adding and converting back gives the band's magnitude.
  const darkZenithNl = nanoLambertsFromMag(input.darkZenithMag - colour);
  const darkNl = darkZenithNl * 10 ** (-0.4 * k * (X - 1)) * X;
  const alpha = phaseAngleDeg(input.moon.illumination);
  const illuminance = moonIlluminance(alpha);
  const scattering = scatteringFunction(input.moon.separationDeg);
  let moonNl = 0;
  let Xm: number | null = null;
  if (input.moon.altitudeDeg > 0) {
    Xm = ksAirmass(90 - input.moon.altitudeDeg);
    moonNl = scattering * illuminance * 10 ** (-0.4 * k * Xm) * (1 - 10 ** (-0.4 * k * X));
  }
  return {
    skyMagPerArcsec2: magFromNanoLamberts(darkNl + moonNl) + colour,
    darkSkyMagPerArcsec2: magFromNanoLamberts(darkNl) + colour,
    moonlightMagPerArcsec2: moonNl > 0 ? magFromNanoLamberts(moonNl) + colour : null,
    terms: { phaseAngleDeg: alpha, illuminance, scattering, airmassTarget: X, airmassMoon: Xm, moonNanoLamberts: moonNl, darkNanoLamberts: darkNl },
  };
}
