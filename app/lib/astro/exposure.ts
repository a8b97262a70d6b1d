// Exposure time and signal-to-noise from the CCD equation (SPEC §3.2):
//   SNR = N* / sqrt(N* + n_pix (N_sky + N_dark + RN²))
// (Howell, Handbook of CCD Astronomy, 2nd ed., §4.4; Merline & Howell 1995, Experimental Astronomy 6, 163),
// all terms in electrons over one exposure.
//
// - N* = F0 · 10^(−0.4 (m + k X)) · A · τ · t · f_ap: band zero point F0 (photons s⁻¹ cm⁻²),
//   collecting area A, total throughput τ (optics × filter × detector QE), and the fraction
//   f_ap of a Gaussian PSF inside the photometric aperture.
// - Aperture: radius = `apertureRadiusFwhm` × FWHM of the seeing, 1.0 by default (common
//   practice; f_ap = 1 − 2^(−4 r²/FWHM²) = 93.75 %). n_pix = π r² / pixel², not rounded.
// - Sky: F0 · 10^(−0.4 μ) · A · τ · pixel² per pixel per second, μ in mag/arcsec². The sky is
//   not extinguished again: tabulated sky brightness is what the site sees.
// - Peak pixel: a Gaussian PSF centred on a pixel puts erf(p / (2√2 σ))² of the light in it.

import type { Band } from "./bands";
import type { MoonCategory } from "../domain";
import { collectingAreaCm2, EXTINCTION, SKY_BRIGHTNESS, ZERO_POINTS } from "./photometry";

export type ExposureInput = {
  band: Band;
  magnitude: number;
  airmass: number;
  seeingArcsec: number;
  skyMagPerArcsec2?: number;
  moonCategory?: MoonCategory;
  extinctionMagPerAirmass?: number;
  /** photons s⁻¹ cm⁻² of a magnitude-0 star over the band; BCP98 when omitted */
  zeroPointPhotons?: number;
  telescope: { apertureM: number; centralObstruction: number };
  instrument: { throughput: number; pixelScaleArcsec: number; readNoiseE: number; darkEPerPixelPerS: number; fullWellE: number };
  apertureRadiusFwhm?: number;
} & ({ snr: number; exposureSeconds?: undefined } | { exposureSeconds: number; snr?: undefined });

export type ExposureResult = {
  exposureSeconds: number;
  snr: number;
  sourceElectrons: number;
  skyElectronsPerPixel: number;
  darkElectronsPerPixel: number;
  pixels: number;
  readNoiseE: number;
  peakPixelElectrons: number;
  saturated: boolean;
  fullWellE: number;
  apertureRadiusArcsec: number;
  apertureFraction: number;
  skyMagPerArcsec2: number;
  extinctionMagPerAirmass: number;
  /** variance (e⁻²) by term; their sum is (source / snr)² */
  noise: { source: number; sky: number; dark: number; read: number };
  regime: "source-limited" | "background-limited" | "read-noise-limited";
};

export type Rates = {
  /** source e⁻/s inside the aperture */
  source: number;
  /** source e⁻/s in the whole PSF */
  sourceTotal: number;
  skyPerPixel: number;
  darkPerPixel: number;
  pixels: number;
  readNoiseE: number;
  peakFraction: number;
  apertureRadiusArcsec: number;
  apertureFraction: number;
  skyMag: number;
  k: number;
};

function erf(x: number): number {
  // Abramowitz & Stegun 7.1.26 (|error| < 1.5e-7)
  const s = Math.sign(x);
  const a = Math.abs(x);
  const t = 1 / (1 + 0.3275911 * a);
  const y = 1 - ((((1.061405429 * t - 1.453152027) * t + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-a * a);
  return s * y;
}

export function rates(input: ExposureInput): Rates {
  const zp = input.zeroPointPhotons ?? ZERO_POINTS[input.band].photonsPerSecondCm2;
  const area = collectingAreaCm2(input.telescope.apertureM, input.telescope.centralObstruction);
  const tau = input.instrument.throughput;
  const k = input.extinctionMagPerAirmass ?? EXTINCTION[input.band];
  const skyMag = input.skyMagPerArcsec2 ?? SKY_BRIGHTNESS[input.band][input.moonCategory ?? "dark"];
  const p = input.instrument.pixelScaleArcsec;
  const fwhm = input.seeingArcsec;
  const sigma = fwhm / (2 * Math.sqrt(2 * Math.LN2));
  const r = (input.apertureRadiusFwhm ?? 1) * fwhm;
  const apertureFraction = 1 - Math.exp(-(r * r) / (2 * sigma * sigma));
  const pixels = Math.max(1, (Math.PI * r * r) / (p * p));
  const sourceTotal = zp * 10 ** (-0.4 * (input.magnitude + k * input.airmass)) * area * tau;
  const peakFraction = erf(p / (2 * Math.SQRT2 * sigma)) ** 2;
  return {
    source: sourceTotal * apertureFraction,
    sourceTotal,
    skyPerPixel: zp * 10 ** (-0.4 * skyMag) * area * tau * p * p,
    darkPerPixel: input.instrument.darkEPerPixelPerS,
    pixels,
    readNoiseE: input.instrument.readNoiseE,
    peakFraction,
    apertureRadiusArcsec: r,
    apertureFraction,
    skyMag,
    k,
  };
}

export function snrForTime(r: Rates, t: number): number {
  const s = r.source * t;
  return s / Math.sqrt(s + r.pixels * ((r.skyPerPixel + r.darkPerPixel) * t + r.readNoiseE ** 2));
}

/**
 * Exposure for a target SNR: S² t² − SNR² (S + n(B + D)) t − SNR² n R² = 0, the positive root.
 */
export function timeForSnr(r: Rates, snr: number): number {
  const S = r.source;
  const b = snr * snr * (S + r.pixels * (r.skyPerPixel + r.darkPerPixel));
  const c = snr * snr * r.pixels * r.readNoiseE ** 2;
  return (b + Math.sqrt(b * b + 4 * S * S * c)) / (2 * S * S);
}

export function computeExposure(input: ExposureInput): ExposureResult {
  const r = rates(input);
  const t = input.exposureSeconds ?? timeForSnr(r, input.snr as number);
  const source = r.source * t;
  const sky = r.skyPerPixel * t;
  const dark = r.darkPerPixel * t;
  const read = r.readNoiseE ** 2;
  const noise = { source, sky: r.pixels * sky, dark: r.pixels * dark, read: r.pixels * read };
  const snr = source / Math.sqrt(source + noise.sky + noise.dark + noise.read);
  const peak = r.sourceTotal * t * r.peakFraction + sky + dark;
  const largest = Math.max(noise.source, noise.sky + noise.dark, noise.read);
  return {
    exposureSeconds: t,
    snr,
    sourceElectrons: source,
    skyElectronsPerPixel: sky,
    darkElectronsPerPixel: dark,
    pixels: r.pixels,
    readNoiseE: r.readNoiseE,
    peakPixelElectrons: peak,
    saturated: peak >= input.instrument.fullWellE,
    fullWellE: input.instrument.fullWellE,
    apertureRadiusArcsec: r.apertureRadiusArcsec,
    apertureFraction: r.apertureFraction,
    skyMagPerArcsec2: r.skyMag,
    extinctionMagPerAirmass: r.k,
    noise,
    regime: largest === noise.source ? "source-limited" : largest === noise.read ? "read-noise-limited" : "background-limited",
  };
}

/** The CCD equation itself, for checks against worked examples. */
export function ccdEquation(a: { sourceElectrons: number; pixels: number; skyPerPixel: number; darkPerPixel: number; readNoiseE: number }): number {
  return a.sourceElectrons / Math.sqrt(a.sourceElectrons + a.pixels * (a.skyPerPixel + a.darkPerPixel + a.readNoiseE ** 2));
}

/**
 * Time on sky for one epoch (one visit): each frame's exposure plus its readout, then the
 * instrument's acquisition (slew, acquisition and set-up) once per visit. The feasibility sheet
 * and the live summary of the observation form both count it this way.
 */
export function secondsPerEpoch(frames: number, exposureSeconds: number, instrument: { readoutSeconds: number; acquisitionSeconds: number }): number {
  return frames * (exposureSeconds + instrument.readoutSeconds) + instrument.acquisitionSeconds;
}
