// The epoch log's arithmetic (pure): each executed epoch's positional precision, given or derived
// from its FWHM and SNR with the repo's centroid formula (astro/astrometry.ts: σ ≈ FWHM / (2.355·SNR)
// per frame, /√frames, the instrument's floor in quadrature), and the five-parameter fit's
// covariance over the epochs taken so far, or over those plus the remaining planned ones.
import { epochPrecisionMas, fitPrecision, parallaxFactors, roundNoNegativeZero } from "~/lib/astro/astrometry";
import { DAY_MS, dayNumber } from "~/lib/astro/time";

export type PrecisionInput = { precisionMas?: number | null; fwhmArcsec?: number | null; snr?: number | null; frames: number; floorMas: number };

/**
 * The per-epoch precision (mas): the office's measured value as given, else derived from the
 * measured FWHM (″) and the SNR per frame it reached; null when neither is there.
 */
export function epochPrecision(a: PrecisionInput): { precisionMas: number; source: "given" | "derived" } | null {
  if (a.precisionMas != null) return { precisionMas: a.precisionMas, source: "given" };
  if (a.fwhmArcsec != null && a.snr != null && a.frames > 0) {
    return { precisionMas: epochPrecisionMas({ fwhmArcsec: a.fwhmArcsec, snr: a.snr, frames: a.frames, floorMas: a.floorMas }), source: "derived" };
  }
  return null;
}

export type FitEpoch = { time: number; sigmaMas: number };

/** JSON-safe fit: null where the epochs cannot yet determine the five parameters (fewer than 3, or degenerate). */
export type PrecisionReached = {
  epochs: number;
  determined: boolean;
  properMotionPrecisionMasPerYr: { ra: number; dec: number } | null;
  parallaxPrecisionMas: number | null;
};

export function precisionReached(raDeg: number, decDeg: number, epochs: FitEpoch[]): PrecisionReached {
  const fit = fitPrecision(raDeg, decDeg, epochs.map((e) => ({ time: e.time, sigmaMas: e.sigmaMas })));
  const r = (x: number) => roundNoNegativeZero(x, 4);
  if (!fit.determined || epochs.length < 3) return { epochs: epochs.length, determined: false, properMotionPrecisionMasPerYr: null, parallaxPrecisionMas: null };
  return {
    epochs: epochs.length,
    determined: true,
    properMotionPrecisionMasPerYr: { ra: r(fit.properMotionPrecisionMasPerYr.ra), dec: r(fit.properMotionPrecisionMasPerYr.dec) },
    parallaxPrecisionMas: r(fit.parallaxPrecisionMas as number),
  };
}

/**
 * When a planned epoch (a local night date) is expected to be taken: the site's local midnight of
 * that night (UTC = the next day 00:00 less the longitude's hours). The planner's own times are the
 * middle of the target's window; for a projection, within hours of it is enough.
 */
export function plannedEpochTime(date: string, longitudeDeg: number): number {
  return (dayNumber(date) + 1) * DAY_MS - (longitudeDeg / 360) * DAY_MS;
}

export function parallaxFactorsAt(raDeg: number, decDeg: number, time: number) {
  const f = parallaxFactors(raDeg, decDeg, time);
  return { ra: roundNoNegativeZero(f.ra, 4), dec: roundNoNegativeZero(f.dec, 4) };
}

/** Whether a fit meets the required proper-motion precision (both components). */
export function meetsRequired(p: PrecisionReached, requiredMasPerYr: number | null): boolean | null {
  if (requiredMasPerYr === null) return null;
  if (!p.properMotionPrecisionMasPerYr) return false;
  return Math.max(p.properMotionPrecisionMasPerYr.ra, p.properMotionPrecisionMasPerYr.dec) <= requiredMasPerYr;
}
