// Forms of the PI's workspace: shared by the browser (react-hook-form) and the actions (safeParse).
import { z } from "zod";
import { BANDS, isBand, type Band } from "~/lib/astro/bands";
import { parseDec, parseRa } from "~/lib/astro/coordinates";
import { moonCategories } from "~/lib/domain";
import { emailField } from "~/lib/email";
import { idSchema, MAX_ID, TEXT_COLUMN_BYTES, utf8Bytes } from "~/lib/forms";
import { ABSTRACT_WORD_LIMIT, scienceCategoryValues, wordCount } from "~/lib/proposals/vocabulary";
import { SEMESTER_CODE } from "~/lib/semesters";


/** Notes of a target (a TEXT column: 65 535 bytes; this many characters of any script fit). */
export const NOTES_MAX_CHARS = 10_000;

/** A number typed into a form (or sent as JSON); "" is "not given". */
function numberField(label: string, opts: { min?: number; max?: number; int?: boolean; required?: boolean; exclusiveMin?: boolean } = {}) {
  return z.union([z.string(), z.number(), z.null()]).optional().transform((raw, ctx): number | null => {
    const text = typeof raw === "number" ? String(raw) : (raw ?? "").trim().replace(/^[−–]/, "-");
    if (text === "") {
      if (opts.required) ctx.addIssue({ code: "custom", message: `Enter the ${label}.` });
      return null;
    }
    const value = Number(text);
    if (!Number.isFinite(value)) {
      ctx.addIssue({ code: "custom", message: `The ${label} must be a number.` });
      return null;
    }
    if (opts.int && !Number.isInteger(value)) ctx.addIssue({ code: "custom", message: `The ${label} must be a whole number.` });
    if (opts.min !== undefined && (opts.exclusiveMin ? value <= opts.min : value < opts.min)) {
      ctx.addIssue({ code: "custom", message: `The ${label} must be ${opts.exclusiveMin ? "more than" : "at least"} ${opts.min}.` });
    }
    if (opts.max !== undefined && value > opts.max) ctx.addIssue({ code: "custom", message: `The ${label} must be at most ${opts.max}.` });
    return value;
  });
}

const flag = z.union([z.boolean(), z.string(), z.null()]).optional().transform((v) => v === true || v === "on" || v === "true" || v === "1");

const title = z.string().trim().min(5, "Give the proposal a title of at least 5 characters.").max(300, "Keep the title under 300 characters.");
const abstract = z
  .string()
  .trim()
  .max(20_000, "The abstract is far too long.")
  .superRefine((text, ctx) => {
    // the column is a TEXT (65 535 bytes); 20 000 characters of 4-byte script would not fit
    if (utf8Bytes(text) > TEXT_COLUMN_BYTES) ctx.addIssue({ code: "custom", message: "The abstract is too long to store; shorten it." });
    const words = wordCount(text);
    if (words > ABSTRACT_WORD_LIMIT) ctx.addIssue({ code: "custom", message: `The abstract has ${words} words; the limit is ${ABSTRACT_WORD_LIMIT}.` });
  });

export const newProposalSchema = z.object({
  callId: idSchema("call", "Choose a call."),
  title,
  abstract: abstract.optional().default(""),
});

export const overviewSchema = z
  .object({
    version: z.coerce.number({ error: "Reload the page: the form's version is missing." }).int("Reload the page: the form's version is missing.").min(0).max(MAX_ID),
    title,
    abstract,
    scienceCategory: z.union([z.enum(scienceCategoryValues, "Choose a science category from the list."), z.literal("")]).transform((v) => v || null),
    isMultiSemester: flag,
    semestersRequested: z
      .union([z.array(z.string()), z.string(), z.null(), z.literal(false)])
      .optional()
      .transform((v) => (Array.isArray(v) ? v : typeof v === "string" && v ? [v] : []))
      .pipe(z.array(z.string().regex(SEMESTER_CODE, "Semesters look like 2027A or 2027B."))),
    isTargetOfOpportunity: flag,
  })
  .superRefine((value, ctx) => {
    if (value.isMultiSemester && value.semestersRequested.length < 2) {
      ctx.addIssue({ code: "custom", path: ["semestersRequested"], message: "A multi-semester programme asks for at least two semesters: tick them." });
    }
  });

export const inviteSchema = z.object({
  email: emailField("Enter the Co-I's e-mail address."),
});

export const memberSchema = z.object({ memberId: idSchema("member", "Choose a member.") });

export const targetSchema = z
  .object({
    name: z.string().trim().min(1, "Give the target a name.").max(120, "Keep the name under 120 characters."),
    ra: z.union([z.string(), z.number()]).transform((v) => String(v)),
    dec: z.union([z.string(), z.number()]).transform((v) => String(v)),
    pmra: numberField("proper motion in RA", { min: -100_000, max: 100_000 }),
    pmdec: numberField("proper motion in Dec", { min: -100_000, max: 100_000 }),
    magnitude: numberField("magnitude", { min: -2, max: 30 }),
    band: z
      .union([z.string(), z.null()])
      .optional()
      .transform((v) => (v ?? "").trim().toUpperCase())
      .refine((v) => v === "" || isBand(v), `The band is one of ${BANDS.join(", ")}.`)
      .transform((v) => v || null),
    // one magnitude per band (form fields and CSV columns mag_U … mag_I); `magnitude` + `band` is the older single pair
    mag_U: numberField("U magnitude", { min: -2, max: 30 }),
    mag_B: numberField("B magnitude", { min: -2, max: 30 }),
    mag_V: numberField("V magnitude", { min: -2, max: 30 }),
    mag_R: numberField("R magnitude", { min: -2, max: 30 }),
    mag_I: numberField("I magnitude", { min: -2, max: 30 }),
    notes: z
      .union([z.string(), z.null()])
      .optional()
      .transform((v) => (v ?? "").trim() || null)
      // characters as a person counts them (code points), bytes as the column does
      .refine((v) => v === null || (v.length <= NOTES_MAX_CHARS * 2 && [...v].length <= NOTES_MAX_CHARS), `Keep the notes under ${NOTES_MAX_CHARS.toLocaleString("en-GB")} characters.`)
      .refine((v) => v === null || v.length > NOTES_MAX_CHARS * 2 || utf8Bytes(v) <= TEXT_COLUMN_BYTES, "The notes are too long to store; shorten them."),
  })
  .transform((value, ctx) => {
    const magnitudes: Partial<Record<Band, number>> = {};
    for (const b of BANDS) {
      const m = value[`mag_${b}`];
      if (m !== null) magnitudes[b] = m;
    }
    if (value.magnitude !== null && value.band) {
      const band = value.band as Band;
      const other = magnitudes[band];
      if (other !== undefined && other !== value.magnitude) {
        ctx.addIssue({ code: "custom", path: ["magnitude"], message: `The ${band} magnitude is given twice (${value.magnitude} and ${other}): keep one.` });
      }
      magnitudes[band] = value.magnitude;
    }
    const ra = parseRa(value.ra, "RA");
    const dec = parseDec(value.dec, "Dec");
    if (!ra.ok) ctx.addIssue({ code: "custom", path: ["ra"], message: ra.message });
    if (!dec.ok) ctx.addIssue({ code: "custom", path: ["dec"], message: dec.message });
    if (value.magnitude !== null && !value.band) ctx.addIssue({ code: "custom", path: ["band"], message: "Give the band of the magnitude." });
    return { ...value, magnitudes, raDeg: ra.ok ? ra.value : NaN, decDeg: dec.ok ? dec.value : NaN };
  });
export type TargetInput = z.output<typeof targetSchema>;

export const observationSchema = z
  .object({
    targetId: idSchema("target", "Choose a target."),
    instrumentId: idSchema("instrument", "Choose an instrument."),
    filterId: idSchema("filter", "Choose a filter."),
    mode: z.enum(["snr", "exposure"], "Choose an SNR goal or an exposure time."),
    snrGoal: numberField("SNR goal", { min: 0, max: 10_000, exclusiveMin: true }),
    exposureSeconds: numberField("exposure time", { min: 0, max: 7_200, exclusiveMin: true }),
    framesPerEpoch: numberField("number of frames per epoch", { min: 1, max: 500, int: true, required: true }),
    epochsPerSemester: numberField("number of epochs per semester", { min: 1, max: 100, int: true, required: true }),
    baselineYears: numberField("baseline", { min: 0, max: 10, exclusiveMin: true }),
    requiredPmPrecisionMasPerYr: numberField("required proper-motion precision", { min: 0, max: 1_000, exclusiveMin: true }),
    moonCategory: z.enum(moonCategories, "Choose dark, grey or bright time."),
    maxAirmass: numberField("airmass limit", { min: 1, max: 3, required: true }),
    seeingArcsec: numberField("seeing", { min: 0.3, max: 5, required: true }),
  })
  .superRefine((value, ctx) => {
    if (value.mode === "snr" && value.snrGoal === null) ctx.addIssue({ code: "custom", path: ["snrGoal"], message: "Enter the SNR goal, or switch to an exposure time." });
    if (value.mode === "exposure" && value.exposureSeconds === null) {
      ctx.addIssue({ code: "custom", path: ["exposureSeconds"], message: "Enter the exposure time, or switch to an SNR goal." });
    }
    if (value.requiredPmPrecisionMasPerYr !== null && value.baselineYears === null) {
      ctx.addIssue({ code: "custom", path: ["baselineYears"], message: "A proper-motion precision needs a baseline in years." });
    }
  })
  .transform((value) => ({
    ...value,
    // exactly one of the two is kept
    snrGoal: value.mode === "snr" ? value.snrGoal : null,
    exposureSeconds: value.mode === "exposure" ? value.exposureSeconds : null,
    // required above, so present whenever the parse succeeds
    framesPerEpoch: value.framesPerEpoch as number,
    epochsPerSemester: value.epochsPerSemester as number,
    maxAirmass: value.maxAirmass as number,
    seeingArcsec: value.seeingArcsec as number,
  }));
export type ObservationInput = z.output<typeof observationSchema>;

export const csvImportSchema = z.object({
  csv: z.string().max(2_000_000, "That CSV is too large for one import (2 MB); split it.").refine((t) => t.trim() !== "", "Paste the CSV or choose a file."),
});
