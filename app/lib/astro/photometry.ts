// Photometric system data: zero points, sky brightness and extinction per band.

import { BANDS, type Band } from "./bands";
import type { MoonCategory } from "../domain";

const H_C_ERG_CM = 6.62607015e-27 * 2.99792458e10;

/**
 * Johnson–Cousins UBVRI zero points of Bessell, Castelli & Plez (1998), A&A 333, 231, Table A2:
 * effective wavelength and the flux density f_λ of a magnitude-0 star (Vega system).
 * Bandwidths are the passbands' FWHM as usually quoted with that table (Bessell 1990 passbands).
 * Values are typed from memory of the table; f_λ to the printed 3–4 digits, bandwidths ±5 %.
 * `photonsPerSecondCm2` is derived here: f_λ · Δλ · λ_eff / (h c), the photon rate over the band
 * from a magnitude-0 star above the atmosphere.
 */
const BCP98: Record<Band, { effectiveWavelengthNm: number; bandwidthNm: number; fLambdaErgPerSCm2A: number }> = {
  U: { effectiveWavelengthNm: 366, bandwidthNm: 65, fLambdaErgPerSCm2A: 4.175e-9 },
  B: { effectiveWavelengthNm: 438, bandwidthNm: 98, fLambdaErgPerSCm2A: 6.32e-9 },
  V: { effectiveWavelengthNm: 545, bandwidthNm: 89, fLambdaErgPerSCm2A: 3.631e-9 },
  R: { effectiveWavelengthNm: 641, bandwidthNm: 138, fLambdaErgPerSCm2A: 2.177e-9 },
  I: { effectiveWavelengthNm: 798, bandwidthNm: 149, fLambdaErgPerSCm2A: 1.126e-9 },
};

export type ZeroPoint = {
  band: Band;
  effectiveWavelengthNm: number;
  bandwidthNm: number;
  fLambdaErgPerSCm2A: number;
  photonsPerSecondCm2: number;
};

export const ZERO_POINTS: Record<Band, ZeroPoint> = Object.fromEntries(
  BANDS.map((band) => {
    const z = BCP98[band];
    const energy = H_C_ERG_CM / (z.effectiveWavelengthNm * 1e-7);
    const photons = (z.fLambdaErgPerSCm2A * z.bandwidthNm * 10) / energy;
    return [band, { band, ...z, photonsPerSecondCm2: photons }];
  }),
) as Record<Band, ZeroPoint>;

export const ZERO_POINT_SOURCE = "Bessell, Castelli & Plez (1998), Table A2 (from memory)";

/**
 * Zenith night-sky brightness (mag/arcsec²) by moon category used when an instrument's filter
 * gives none: the invented demo site's own INVENTED values (the same as the Kestrel Ridge seed),
 * not measured and not copied from any observatory's table. Real skies vary by ±0.5 mag with
 * solar activity, zenith distance and the Moon's distance from the field; with the Moon's
 * position given, astro/moonlight.ts models the moonlit sky instead.
 */
export const SKY_BRIGHTNESS: Record<Band, Record<MoonCategory, number>> = {
  U: { dark: 21.9, grey: 20.2, bright: 18.3 },
  B: { dark: 22.5, grey: 21.2, bright: 19.5 },
  V: { dark: 21.6, grey: 20.7, bright: 19.4 },
  R: { dark: 20.8, grey: 20.1, bright: 19.1 },
  I: { dark: 19.8, grey: 19.4, bright: 18.7 },
};

export const SKY_BRIGHTNESS_SOURCE = "the invented demo site's own values (not measured, not copied from any observatory)";

/** Typical extinction coefficients k (mag/airmass) at a good high site; common practice, from memory. */
export const EXTINCTION: Record<Band, number> = { U: 0.55, B: 0.25, V: 0.15, R: 0.1, I: 0.06 };

/** Collecting area (cm²) of a circular aperture with a central obstruction given as a fraction of the DIAMETER. */
export function collectingAreaCm2(apertureM: number, centralObstruction: number): number {
  const r = (apertureM * 100) / 2;
  return Math.PI * r * r * (1 - centralObstruction * centralObstruction);
}
