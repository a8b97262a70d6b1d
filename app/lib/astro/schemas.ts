// zod schemas shared by the JSON API (api.v1.*) and the Sky tools forms. Numbers are accepted
// as JSON numbers or as the strings a form or a query string carries; an empty string is "missing".
import { z } from "zod";
import { parseDec, parseRa } from "./coordinates";
import { BANDS } from "./bands";
import { moonCategories } from "../domain";
import { timeZoneSchema } from "../time-zones";
import { isIsoDate } from "./time";

const blankToUndefined = (v: unknown) => (v === "" || v === null ? undefined : typeof v === "string" ? Number(v.trim()) : v);

export function num(label: string, min: number, max: number, opts: { int?: boolean; exclusiveMin?: boolean } = {}) {
  let n = z.number({ error: (i) => (i.input === undefined ? `${label} is required` : `${label} must be a number`) });
  if (opts.int) n = n.int({ error: `${label} must be a whole number` });
  n = opts.exclusiveMin ? n.gt(min, { error: `${label} must be greater than ${min}` }) : n.min(min, { error: `${label} must be at least ${min}` });
  n = n.max(max, { error: `${label} must be at most ${max}` });
  return z.preprocess(blankToUndefined, n);
}

const optionalNum = (label: string, min: number, max: number) => num(label, min, max).optional();

export const raField = z.union([z.number(), z.string().max(64, { error: "RA is too long" })], { error: "RA is required" }).transform((v, ctx) => {
  const r = parseRa(v, "RA");
  if (!r.ok) {
    ctx.addIssue({ code: "custom", message: r.message });
    return z.NEVER;
  }
  return r.value;
});

export const decField = z.union([z.number(), z.string().max(64, { error: "Dec is too long" })], { error: "Dec is required" }).transform((v, ctx) => {
  const r = parseDec(v, "Dec");
  if (!r.ok) {
    ctx.addIssue({ code: "custom", message: r.message });
    return z.NEVER;
  }
  return r.value;
});

export const dateField = z
  .string({ error: "date is required (YYYY-MM-DD)" })
  .refine(isIsoDate, { error: "must be a calendar date YYYY-MM-DD" })
  .refine((d) => d >= "1900-01-01" && d <= "2199-12-31", { error: "must lie between 1900 and 2199" });

// Canonicalised ("europe/madrid" → "Europe/Madrid"), so the caches keyed by zone see one name per zone.
export const timeZoneField = timeZoneSchema("must be an IANA time zone, e.g. Europe/Madrid");

const idField = z.preprocess(blankToUndefined, z.number({ error: "must be a numeric id" }).int({ error: "must be a numeric id" }).positive({ error: "must be a numeric id" }).max(4_294_967_295, { error: "must be a numeric id" }));

/** Query of GET /api/v1/visibility (also the Sky tools visibility form). */
export const visibilityQuerySchema = z
  .object({
    telescope: idField.optional(),
    lat: optionalNum("lat", -90, 90),
    lon: optionalNum("lon", -180, 180),
    elevation: optionalNum("elevation", -500, 9000),
    timeZone: timeZoneField.optional(),
    ra: raField,
    dec: decField,
    pmRa: optionalNum("pmRa", -20000, 20000),
    pmDec: optionalNum("pmDec", -20000, 20000),
    from: dateField,
    nights: num("nights", 1, 366, { int: true }),
    minAltitude: optionalNum("minAltitude", 0, 89),
    maxAirmass: optionalNum("maxAirmass", 1, 10),
    night: dateField.optional(),
  })
  .superRefine((q, ctx) => {
    if (q.telescope === undefined) {
      for (const key of ["lat", "lon"] as const) {
        if (q[key] === undefined) ctx.addIssue({ code: "custom", path: [key], message: `${key} is required unless telescope is given` });
      }
    }
    if (q.minAltitude !== undefined && q.maxAirmass !== undefined) {
      ctx.addIssue({ code: "custom", path: ["maxAirmass"], message: "give minAltitude or maxAirmass, not both" });
    }
  });
export type VisibilityQuery = z.output<typeof visibilityQuerySchema>;

const telescopeBody = z.object({
  apertureM: num("apertureM", 0.05, 50, { exclusiveMin: true }),
  centralObstruction: num("centralObstruction", 0, 0.95),
});
const instrumentBody = z.object({
  throughput: num("throughput", 0, 1, { exclusiveMin: true }),
  pixelScaleArcsec: num("pixelScaleArcsec", 0.01, 10),
  readNoiseE: num("readNoiseE", 0, 1000),
  darkEPerPixelPerS: num("darkEPerPixelPerS", 0, 1000),
  fullWellE: num("fullWellE", 100, 1e8),
});

/** Body of POST /api/v1/exposure. */
export const exposureBodySchema = z
  .object({
    band: z.enum(BANDS, { error: `band must be one of ${BANDS.join(", ")}` }),
    magnitude: num("magnitude", -5, 35),
    snr: optionalNum("snr", 0.1, 100000),
    exposureSeconds: optionalNum("exposureSeconds", 0.001, 1e6),
    airmass: optionalNum("airmass", 1, 10),
    targetAltitudeDeg: optionalNum("targetAltitudeDeg", 5.8, 90),
    /** the Moon for the Krisciunas & Schaefer (1991) sky model */
    moon: z
      .object(
        {
          illumination: num("moon.illumination", 0, 1),
          separationDeg: num("moon.separationDeg", 0, 180),
          altitudeDeg: num("moon.altitudeDeg", -90, 90),
        },
        { error: "moon must be an object { illumination, separationDeg, altitudeDeg }" },
      )
      .optional(),
    seeingArcsec: num("seeingArcsec", 0.1, 10),
    skyMagPerArcsec2: optionalNum("skyMagPerArcsec2", 10, 25),
    moonCategory: z.enum(moonCategories, { error: `moonCategory must be ${moonCategories.slice(0, -1).join(", ")} or ${moonCategories.at(-1)}` }).optional(),
    extinctionMagPerAirmass: optionalNum("extinctionMagPerAirmass", 0, 3),
    telescope: telescopeBody.optional(),
    telescopeId: idField.optional(),
    instrument: instrumentBody.optional(),
    instrumentId: idField.optional(),
  })
  .superRefine((b, ctx) => {
    if ((b.snr === undefined) === (b.exposureSeconds === undefined)) {
      ctx.addIssue({ code: "custom", path: ["snr"], message: "give exactly one of snr or exposureSeconds" });
    }
    if (b.skyMagPerArcsec2 !== undefined && b.moonCategory !== undefined) {
      ctx.addIssue({ code: "custom", path: ["skyMagPerArcsec2"], message: "give skyMagPerArcsec2 or moonCategory, not both" });
    }
    if (b.airmass === undefined && b.targetAltitudeDeg === undefined) {
      ctx.addIssue({ code: "custom", path: ["airmass"], message: "give the air mass, or the target's altitude" });
    }
    if (b.airmass !== undefined && b.targetAltitudeDeg !== undefined) {
      ctx.addIssue({ code: "custom", path: ["targetAltitudeDeg"], message: "give the airmass or targetAltitudeDeg, not both" });
    }
    if (b.moon !== undefined && (b.skyMagPerArcsec2 !== undefined || b.moonCategory !== undefined)) {
      ctx.addIssue({ code: "custom", path: ["moon"], message: "with moon the sky comes from the moonlight model: leave out skyMagPerArcsec2 and moonCategory" });
    }
    if (!b.telescope && b.telescopeId === undefined) ctx.addIssue({ code: "custom", path: ["telescope"], message: "telescope or telescopeId is required" });
    if (!b.instrument && b.instrumentId === undefined) ctx.addIssue({ code: "custom", path: ["instrument"], message: "instrument or instrumentId is required" });
  });
export type ExposureBody = z.output<typeof exposureBodySchema>;

/** Body of POST /api/v1/astrometry. */
export const astrometryBodySchema = z.object({
  raDeg: raField,
  decDeg: decField,
  epochs: z.array(dateField, { error: "epochs must be a list of dates" }).min(3, { error: "at least 3 epochs are needed for 5 parameters" }).max(500, { error: "at most 500 epochs" }),
  positionalPrecisionMas: num("positionalPrecisionMas", 0.001, 100000, { exclusiveMin: true }),
});
export type AstrometryBody = z.output<typeof astrometryBodySchema>;

const siteBody = z.object({
  latitudeDeg: num("latitudeDeg", -90, 90),
  longitudeDeg: num("longitudeDeg", -180, 180),
  elevationM: num("elevationM", -500, 9000),
  timeZone: timeZoneField,
});

/** Body of POST /api/v1/epoch-plan (documented in README). */
export const epochPlanBodySchema = z
  .object({
    site: siteBody.optional(),
    telescopeId: idField.optional(),
    target: z.object({
      ra: raField,
      dec: decField,
      pmRaCosDecMasPerYr: optionalNum("pmRaCosDecMasPerYr", -20000, 20000),
      pmDecMasPerYr: optionalNum("pmDecMasPerYr", -20000, 20000),
    }),
    firstDate: dateField,
    baselineYears: num("baselineYears", 0.25, 6),
    epochs: z.preprocess(blankToUndefined, z.number({ error: "epochs must be a number" }).int({ error: "epochs must be a whole number" }).min(3, { error: "epochs must be at least 3" }).max(60, { error: "epochs must be at most 60" })).optional(),
    requiredProperMotionMasPerYr: optionalNum("requiredProperMotionMasPerYr", 0.001, 10000),
    requiredTangentialVelocityKmS: optionalNum("requiredTangentialVelocityKmS", 0.001, 10000),
    distancePc: optionalNum("distancePc", 0.1, 1e7),
    perEpochPrecisionMas: optionalNum("perEpochPrecisionMas", 0.001, 100000),
    fwhmArcsec: optionalNum("fwhmArcsec", 0.1, 10),
    snr: optionalNum("snr", 1, 100000),
    frames: z.preprocess(blankToUndefined, z.number({ error: "frames must be a number" }).int().min(1).max(1000)).optional(),
    floorMas: optionalNum("floorMas", 0, 1000),
    minAltitude: optionalNum("minAltitude", 0, 89),
    maxAirmass: optionalNum("maxAirmass", 1, 10),
    secondsPerEpoch: optionalNum("secondsPerEpoch", 0, 86400),
    toleranceNights: z.preprocess(blankToUndefined, z.number({ error: "toleranceNights must be a number" }).int({ error: "toleranceNights must be a whole number" }).min(0, { error: "toleranceNights must be at least 0" }).max(60, { error: "toleranceNights must be at most 60" })).optional(),
    movedEpochs: z.array(z.string().max(40).refine((s) => isIsoDate(s) || !Number.isNaN(Date.parse(s)), { error: "must be a date or an ISO time" })).max(60).optional(),
  })
  .superRefine((b, ctx) => {
    if (!b.site && b.telescopeId === undefined) ctx.addIssue({ code: "custom", path: ["site"], message: "site or telescopeId is required" });
    const modes = [b.epochs !== undefined, b.requiredProperMotionMasPerYr !== undefined, b.requiredTangentialVelocityKmS !== undefined].filter(Boolean).length;
    if (modes !== 1) ctx.addIssue({ code: "custom", path: ["epochs"], message: "give exactly one of epochs, requiredProperMotionMasPerYr or requiredTangentialVelocityKmS" });
    if (b.requiredTangentialVelocityKmS !== undefined && b.distancePc === undefined) ctx.addIssue({ code: "custom", path: ["distancePc"], message: "distancePc is required with requiredTangentialVelocityKmS" });
    if (b.perEpochPrecisionMas === undefined && (b.fwhmArcsec === undefined || b.snr === undefined)) {
      ctx.addIssue({ code: "custom", path: ["perEpochPrecisionMas"], message: "give perEpochPrecisionMas, or fwhmArcsec and snr" });
    }
    if (b.minAltitude !== undefined && b.maxAirmass !== undefined) ctx.addIssue({ code: "custom", path: ["maxAirmass"], message: "give minAltitude or maxAirmass, not both" });
  });
export type EpochPlanBody = z.output<typeof epochPlanBodySchema>;
