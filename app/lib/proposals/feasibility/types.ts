// The feasibility sheet's input (plain data, loaded by feasibility.server.ts) and output (plain
// JSON: the route, the API and the PDF read it).

import type { SemesterSpan } from "../../semesters";
import type { ExposureResult } from "../../astro/exposure";
import type { MOON_CATEGORY_THRESHOLDS, MoonCategory, Site } from "../../astro/visibility";

// ---------------------------------------------------------------------------------------------
// Input

export type SheetTelescope = { id: number; name: string; site: Site; apertureM: number; centralObstruction: number };
export type SheetInstrument = {
  id: number;
  telescopeId: number;
  name: string;
  pixelScaleArcsec: number;
  readNoiseE: number;
  darkEPerPixelPerS: number;
  gainEPerAdu: number;
  fullWellE: number;
  readoutSeconds: number;
  acquisitionSeconds: number;
  astrometricFloorMas: number;
  throughput: number;
};
export type SheetFilter = {
  id: number;
  instrumentId: number;
  band: string;
  zeroPointPhotons: number;
  extinctionMagPerAirmass: number;
  skyDarkMag: number;
  skyGreyMag: number;
  skyBrightMag: number;
};
export type SheetTarget = {
  id: number;
  name: string;
  raDeg: number;
  decDeg: number;
  pmRaMasPerYr: number | null;
  pmDecMasPerYr: number | null;
  /** magnitudes by band (band → magnitude); `magnitude`/`band` are the first of them */
  magnitudes: Record<string, number>;
  magnitude: number | null;
  band: string | null;
};
export type SheetEpoch = { id?: number; date: string; semesterCode: string; status: "planned" | "observed" | "missed" };
export type SheetObservation = {
  id: number;
  targetId: number;
  instrumentId: number;
  filterId: number;
  snrGoal: number | null;
  exposureSeconds: number | null;
  framesPerEpoch: number;
  epochsPerSemester: number;
  baselineYears: number | null;
  requiredPmPrecisionMasPerYr: number | null;
  moonCategory: MoonCategory;
  maxAirmass: number;
  seeingArcsec: number;
  epochs: SheetEpoch[];
  /** ± nights in which an epoch may be taken (default EPOCH_TOLERANCE_NIGHTS) */
  epochToleranceNights?: number;
};
export type FeasibilityInput = {
  proposalId: number;
  call: {
    semesterCode: string;
    semesterStart: string;
    semesterEnd: string;
    offers: { telescopeId: number; moonCategory: MoonCategory; hoursOffered: number }[];
    /** dates of later semesters where the office has set up their calls (code, start, end) */
    laterSemesters?: SemesterSpan[];
  };
  isMultiSemester: boolean;
  semestersRequested: string[];
  telescopes: SheetTelescope[];
  instruments: SheetInstrument[];
  filters: SheetFilter[];
  targets: SheetTarget[];
  observations: SheetObservation[];
};

// ---------------------------------------------------------------------------------------------
// Output (plain JSON: the route, the API and the PDF read it)

export type Problem = { severity: "blocking" | "warning"; message: string; targetId?: number; observationId?: number };

export type SheetNight = {
  date: string;
  moonCategory: MoonCategory;
  moonIllumination: number;
  darkHours: number;
  moonrise: string | null;
  moonset: string | null;
  /** the dark interval split at moonrise and moonset */
  darkHoursByMoonCategory: Record<MoonCategory, number>;
};

export type ObservationSheet = {
  observationId: number;
  targetId: number;
  targetName: string;
  telescopeId: number;
  telescopeName: string;
  instrumentName: string;
  band: string;
  moonCategory: MoonCategory;
  maxAirmass: number;
  minAltitudeDeg: number;
  seeingArcsec: number;
  visibility: {
    observableHours: number;
    byMoonCategory: Record<MoonCategory, number>;
    /** hours of this observation's moon category or darker, split at moonrise and moonset */
    usableHours: number;
    /** nights with some usable hours */
    usableNights: number;
    darkHours: number;
    bestMonths: { month: string; observableHours: number }[];
    /** aligned with the site's nights (`sheet.sites[telescopeId].nights`) */
    hoursPerNight: number[];
    /** the night with the longest window, for the altitude chart */
    bestNight: string | null;
    bestAirmass: number | null;
  };
  exposure:
    | (Pick<
        ExposureResult,
        | "exposureSeconds"
        | "snr"
        | "sourceElectrons"
        | "skyElectronsPerPixel"
        | "darkElectronsPerPixel"
        | "pixels"
        | "readNoiseE"
        | "peakPixelElectrons"
        | "fullWellE"
        | "apertureRadiusArcsec"
        | "apertureFraction"
        | "skyMagPerArcsec2"
        | "extinctionMagPerAirmass"
        | "noise"
        | "regime"
      > & {
        airmass: number;
        magnitude: number;
        /** peak pixel at the best airmass (saturation check) */
        peakAtBestAirmassElectrons: number;
        saturated: boolean;
        /** longest exposure that keeps the peak pixel below full well at the best airmass */
        maxUnsaturatedSeconds: number;
        mode: "snr-goal" | "exposure-time";
      })
    | null;
  timePerEpoch: {
    frames: number;
    exposureSeconds: number | null;
    readoutSeconds: number;
    acquisitionSeconds: number;
    totalSeconds: number | null;
  };
  /** epochs counted in the call's semester */
  epochsThisSemester: number;
  requestedHoursThisSemester: number;
  /** which band's magnitude the exposure used, and whether it is the observation's own */
  magnitudeUsed: { band: string; magnitude: number; assumed: boolean } | null;
  astrometry: null | {
    baselineYears: number;
    source: "planned" | "proposed";
    perEpochPrecisionMas: number | null;
    /** photon-noise part of the per-epoch precision and the instrument's floor (mas) */
    photonPrecisionMas: number | null;
    floorMas: number;
    floorDominated: boolean;
    requiredPmPrecisionMasPerYr: number | null;
    /** epochs per semester asked for, and per semester placed */
    epochsPerSemester: number;
    toleranceNights: number;
    /** what would meet the requirement over the same baseline, when it is not met */
    advice: string[];
    properMotionPrecisionMasPerYr: { ra: number; dec: number } | null;
    parallaxPrecisionMas: number | null;
    determined: boolean;
    met: boolean | null;
    epochs: {
      date: string;
      semesterCode: string;
      status: SheetEpoch["status"];
      parallaxFactorRa: number;
      parallaxFactorDec: number;
      observableHours: number | null;
      inWindow: boolean | null;
      /** ± tolerance nights around the epoch and how many of them have time for the visit */
      window: { from: string; to: string; usableNights: number } | null;
      fragile: boolean;
    }[];
    perSemester: { semesterCode: string; epochs: number; hours: number }[];
    parallaxCurve: { date: string; ra: number; dec: number }[];
    message?: string;
  };
};

export type FeasibilitySheet = {
  proposalId: number;
  semesterCode: string;
  semesterStart: string;
  semesterEnd: string;
  computedAt: string;
  conventions: {
    moonCategoryThresholds: typeof MOON_CATEGORY_THRESHOLDS;
    moonTimeRule: string;
    twilightAltitudeDeg: number;
    refraction: string;
    airmassFormula: string;
    exposure: string;
    centroid: string;
    timePerEpoch: string;
  };
  sites: Record<number, { telescopeName: string; site: Site; nights: SheetNight[] }>;
  observations: ObservationSheet[];
  targets: {
    targetId: number;
    name: string;
    raDeg: number;
    decDeg: number;
    pmRaMasPerYr: number | null;
    pmDecMasPerYr: number | null;
    magnitude: number | null;
    band: string | null;
    magnitudes: Record<string, number>;
    observationIds: number[];
  }[];
  /** per telescope, semester and moon category; the call's own semester first, then the later ones in order */
  totals: { telescopeId: number; telescopeName: string; semesterCode: string; moonCategory: MoonCategory; hours: number; offeredHours: number | null }[];
  /** hours asked for in each semester, the call's own first (always present), then the later ones */
  requestedHoursBySemester: { semesterCode: string; hours: number; callSemester: boolean }[];
  /** hours asked for in the call's own semester */
  requestedHoursThisSemester: number;
  /** all semesters together */
  requestedHours: number;
  problems: Problem[];
};
