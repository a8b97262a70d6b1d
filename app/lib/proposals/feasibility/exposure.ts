// Exposure part of one observation: the magnitude it uses, exposure and SNR per frame (CCD
// equation, astro/exposure.ts) at the airmass limit, saturation at the best airmass, and the
// time per epoch.

import { computeExposure, secondsPerEpoch } from "../../astro/exposure";
import { BANDS, isBand, type Band } from "../../astro/bands";
import type { MoonCategory } from "../../astro/visibility";
import { r } from "./common";
import type { ObservationSheet, Problem, SheetFilter, SheetInstrument, SheetObservation, SheetTarget, SheetTelescope } from "./types";

/** a peak above this fraction of full well is in the detector's non-linear range: a warning */
export const NONLINEAR_FRACTION = 0.8;
/** a single frame longer than this collects many cosmic rays and tracking errors: a warning */
export const LONG_FRAME_SECONDS = 1800;

/**
 * The magnitude an exposure in `band` uses: the target's own in that band, else the one in the
 * nearest band it has (by effective wavelength, U B V R I), flagged as assumed (colour 0).
 */
export function magnitudeFor(magnitudes: Record<string, number>, band: string): { band: string; magnitude: number; assumed: boolean } | null {
  if (Number.isFinite(magnitudes[band])) return { band, magnitude: magnitudes[band], assumed: false };
  const order: readonly string[] = BANDS;
  const at = order.indexOf(band);
  const have = Object.keys(magnitudes).filter((b) => Number.isFinite(magnitudes[b]));
  if (have.length === 0) return null;
  const distance = (b: string) => (at < 0 || order.indexOf(b) < 0 ? 99 : Math.abs(order.indexOf(b) - at));
  const nearest = [...have].sort((a, b) => distance(a) - distance(b) || order.indexOf(a) - order.indexOf(b))[0];
  return { band: nearest, magnitude: magnitudes[nearest], assumed: true };
}

function asBand(band: string): Band {
  return isBand(band) ? band : "V";
}

function skyFor(filter: SheetFilter, category: MoonCategory) {
  return category === "dark" ? filter.skyDarkMag : category === "grey" ? filter.skyGreyMag : filter.skyBrightMag;
}

function fmtE(x: number) {
  return x >= 1e6 ? `${(x / 1e6).toFixed(2)} M` : x >= 1e4 ? `${Math.round(x / 1000)} k` : `${Math.round(x)}`;
}

type ExposureArgs = {
  obs: SheetObservation;
  target: SheetTarget;
  instrument: SheetInstrument;
  filter: SheetFilter;
  telescope: SheetTelescope;
  bestAirmass: number | null;
  label: string;
  where: { targetId: number; observationId: number };
  problems: Problem[];
};

export function exposurePart(a: ExposureArgs): { exposure: ObservationSheet["exposure"]; used: ObservationSheet["magnitudeUsed"] } {
  const { obs, target, instrument, filter, telescope, bestAirmass, label, where, problems } = a;
  // Exposure and SNR per frame (CCD equation, astro/exposure.ts).
  let exposure: ObservationSheet["exposure"] = null;
  const exposureBase = {
    band: asBand(filter.band),
    airmass: obs.maxAirmass,
    seeingArcsec: obs.seeingArcsec,
    skyMagPerArcsec2: skyFor(filter, obs.moonCategory),
    extinctionMagPerAirmass: filter.extinctionMagPerAirmass,
    zeroPointPhotons: filter.zeroPointPhotons,
    telescope: { apertureM: telescope.apertureM, centralObstruction: telescope.centralObstruction },
    instrument: {
      throughput: instrument.throughput,
      pixelScaleArcsec: instrument.pixelScaleArcsec,
      readNoiseE: instrument.readNoiseE,
      darkEPerPixelPerS: instrument.darkEPerPixelPerS,
      fullWellE: instrument.fullWellE,
    },
  };
  const used = magnitudeFor(target.magnitudes, filter.band);
  if (used === null) {
    if (obs.snrGoal !== null) {
      problems.push({ severity: "blocking", ...where, message: `${label}: the target has no magnitude, so the exposure time for SNR ${obs.snrGoal} cannot be computed. Add its magnitude on the targets tab.` });
    } else {
      problems.push({ severity: "warning", ...where, message: `${label}: the target has no magnitude, so the SNR of the ${obs.exposureSeconds} s exposures is unknown.` });
    }
  } else if (obs.snrGoal === null && obs.exposureSeconds === null) {
    problems.push({ severity: "blocking", ...where, message: `${label}: give either an SNR goal or an exposure time.` });
  } else {
    const magnitude = used.magnitude;
    const result =
      obs.snrGoal !== null
        ? computeExposure({ ...exposureBase, magnitude, snr: obs.snrGoal })
        : computeExposure({ ...exposureBase, magnitude, exposureSeconds: obs.exposureSeconds as number });
    // Saturation where the star is brightest: same exposure at the best airmass.
    const atBest = computeExposure({ ...exposureBase, magnitude, airmass: bestAirmass ?? obs.maxAirmass, exposureSeconds: result.exposureSeconds });
    const peakRate = atBest.peakPixelElectrons / result.exposureSeconds;
    const maxUnsaturatedSeconds = peakRate > 0 ? instrument.fullWellE / peakRate : Number.POSITIVE_INFINITY;
    const saturated = atBest.peakPixelElectrons >= instrument.fullWellE;
    exposure = {
      exposureSeconds: result.exposureSeconds,
      snr: result.snr,
      sourceElectrons: result.sourceElectrons,
      skyElectronsPerPixel: result.skyElectronsPerPixel,
      darkElectronsPerPixel: result.darkElectronsPerPixel,
      pixels: result.pixels,
      readNoiseE: result.readNoiseE,
      peakPixelElectrons: result.peakPixelElectrons,
      fullWellE: result.fullWellE,
      apertureRadiusArcsec: result.apertureRadiusArcsec,
      apertureFraction: result.apertureFraction,
      skyMagPerArcsec2: result.skyMagPerArcsec2,
      extinctionMagPerAirmass: result.extinctionMagPerAirmass,
      noise: result.noise,
      regime: result.regime,
      airmass: obs.maxAirmass,
      magnitude,
      peakAtBestAirmassElectrons: atBest.peakPixelElectrons,
      saturated,
      maxUnsaturatedSeconds: Number.isFinite(maxUnsaturatedSeconds) ? maxUnsaturatedSeconds : 1e9,
      mode: obs.snrGoal !== null ? "snr-goal" : "exposure-time",
    };
    if (used.assumed) {
      problems.push({
        severity: "warning",
        ...where,
        message: `${label}: the target has no ${filter.band} magnitude. The exposure assumes ${filter.band} = ${used.band} = ${used.magnitude} (colour ${filter.band} − ${used.band} = 0), which is wrong by the star's colour; add its ${filter.band} magnitude on the targets tab.`,
      });
    }
    if (saturated) {
      // Blocking: a saturated star gives neither a centroid nor a flux. The fix is in the
      // PI's hands (shorter frames, more of them), and the message says by how much.
      const frames = Math.ceil((obs.framesPerEpoch * result.exposureSeconds) / Math.max(maxUnsaturatedSeconds, 0.001));
      problems.push({
        severity: "blocking",
        ...where,
        message:
          maxUnsaturatedSeconds < 1
            ? `${label}: saturates even in 1 s (peak ${fmtE(atBest.peakPixelElectrons)} e⁻ against a full well of ${fmtE(instrument.fullWellE)} e⁻): choose a redder or narrower filter or a fainter target.`
            : `${label}: frames of ${r(result.exposureSeconds, 1)} s saturate at airmass ${r(bestAirmass ?? obs.maxAirmass, 2)} (peak ${fmtE(atBest.peakPixelElectrons)} e⁻, full well ${fmtE(instrument.fullWellE)} e⁻). Keep frames at or below ${r(maxUnsaturatedSeconds, 1)} s, e.g. ${frames} frames per epoch for the same total exposure.`,
      });
    } else if (atBest.peakPixelElectrons >= NONLINEAR_FRACTION * instrument.fullWellE) {
      problems.push({ severity: "warning", ...where, message: `${label}: the peak pixel reaches ${Math.round((100 * atBest.peakPixelElectrons) / instrument.fullWellE)} % of full well at the best airmass, where the detector may be non-linear.` });
    }
    if (result.exposureSeconds > LONG_FRAME_SECONDS) {
      problems.push({ severity: "warning", ...where, message: `${label}: single frames of ${Math.round(result.exposureSeconds)} s collect many cosmic rays; consider more, shorter frames.` });
    }
  }
  return { exposure, used };
}

/** Time per epoch = frames × (exposure + readout) + acquisition. */
export function timePerEpochPart(obs: SheetObservation, instrument: SheetInstrument, exposure: ObservationSheet["exposure"]) {
  const frameSeconds = exposure?.exposureSeconds ?? obs.exposureSeconds;
  const totalSeconds = frameSeconds === null ? null : secondsPerEpoch(obs.framesPerEpoch, frameSeconds, instrument);
  const timePerEpoch = {
    frames: obs.framesPerEpoch,
    exposureSeconds: frameSeconds,
    readoutSeconds: instrument.readoutSeconds,
    acquisitionSeconds: instrument.acquisitionSeconds,
    totalSeconds,
  };
  const epochHours = totalSeconds === null ? 0 : totalSeconds / 3600;
  return { timePerEpoch, totalSeconds, epochHours };
}
