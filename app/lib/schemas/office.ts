// The observatory office's set-up forms: one schema per form, shared by the browser (checked
// before sending) and the action (checked again). Numbers arrive as typed text; an empty field is
// a message, never a silent 0.
import { z } from "zod";
import { isIsoDate } from "~/lib/astro/time";
import { moonCategories, teamVisibilities, type TeamVisibility } from "~/lib/domain";
import { DEFAULT_REVIEWS_PER_SUBMITTER, MAX_REVIEWS_PER_SUBMITTER, reviewModes, unreviewedPolicies, type ReviewMode, type UnreviewedPolicy } from "~/lib/review/vocabulary";
import { addMonths, SEMESTER_CODE } from "~/lib/semesters";
import { isValidTimeZone, timeZoneSchema } from "~/lib/time-zones";
import { startOfDateInZone, zonedLocalToUtc } from "~/lib/zoned-time";

interface NumberRule {
  min: number;
  max: number;
  /** shown in messages, e.g. "m" or "e⁻" */
  unit?: string;
  /** the lower bound itself is not allowed */
  positive?: boolean;
  integer?: boolean;
}

const show = (n: number) => (Math.abs(n) >= 1e5 ? n.toExponential().replace("e+", "e") : String(n));

/** A number typed into a field: required, finite, within range; the message names the field. */
export function numberField(label: string, rule: NumberRule) {
  const unit = rule.unit ? (rule.unit.startsWith("°") ? rule.unit : ` ${rule.unit}`) : "";
  const range = `${rule.positive ? "more than" : "from"} ${show(rule.min)} ${rule.positive ? "and at most" : "to"} ${show(rule.max)}${unit}`;
  let number = z.number({ error: `${label} must be a number (use a point for decimals).` });
  number = rule.positive
    ? number.gt(rule.min, `${label} must be ${range}.`)
    : number.min(rule.min, `${label} must be ${range}.`);
  number = number.max(rule.max, `${label} must be ${range}.`);
  if (rule.integer) number = number.int(`${label} must be a whole number.`);
  return z.preprocess(
    (value) => (typeof value === "number" ? String(value) : value),
    z
      .string({ error: `Enter the ${label.toLowerCase()}.` })
      .trim()
      .min(1, `Enter the ${label.toLowerCase()}.`)
      .transform((text) => (/^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?$/i.test(text) ? Number(text) : Number.NaN))
      .pipe(number),
  );
}

const name = (what: string, max = 120) =>
  z
    .string({ error: `Enter the ${what}.` })
    .trim()
    .min(1, `Enter the ${what}.`)
    .max(max, `The ${what} is too long (at most ${max} characters).`);

// ---------------------------------------------------------------- telescopes

export const telescopeSchema = z.object({
  name: name("telescope's name"),
  siteName: name("site name"),
  latitudeDeg: numberField("Latitude", { min: -90, max: 90, unit: "° (north positive)" }),
  longitudeDeg: numberField("Longitude", { min: -180, max: 180, unit: "° (east positive)" }),
  elevationM: numberField("Elevation", { min: -500, max: 6000, unit: "m" }),
  timeZone: z
    .string({ error: "Choose the site's time zone." })
    .trim()
    .min(1, "Choose the site's time zone.")
    .pipe(timeZoneSchema("That is not an IANA time zone; pick one from the list, like America/Denver.")),
  apertureM: numberField("Aperture", { min: 0.05, max: 50, unit: "m" }),
  centralObstruction: numberField("Central obstruction", { min: 0, max: 0.9, unit: "of the diameter" }),
});
export type TelescopeInput = z.infer<typeof telescopeSchema>;

// ---------------------------------------------------------------- instruments

export const instrumentSchema = z.object({
  name: name("instrument's name"),
  pixelScaleArcsec: numberField("Pixel scale", { min: 0, max: 20, unit: "″/pixel", positive: true }),
  readNoiseE: numberField("Read noise", { min: 0, max: 200, unit: "e⁻" }),
  darkEPerPixelPerS: numberField("Dark current", { min: 0, max: 100, unit: "e⁻/pixel/s" }),
  gainEPerAdu: numberField("Gain", { min: 0, max: 100, unit: "e⁻/ADU", positive: true }),
  fullWellE: numberField("Full well", { min: 100, max: 1e7, unit: "e⁻" }),
  readoutSeconds: numberField("Readout overhead", { min: 0, max: 3600, unit: "s" }),
  acquisitionSeconds: numberField("Acquisition overhead", { min: 0, max: 7200, unit: "s" }),
  astrometricFloorMas: numberField("Systematic astrometric floor", { min: 0, max: 1000, unit: "mas" }),
  throughput: numberField("Throughput", { min: 0, max: 1, positive: true }),
});
export type InstrumentInput = z.infer<typeof instrumentSchema>;

// ---------------------------------------------------------------- filters

export const filterSchema = z
  .object({
    band: z
      .string({ error: "Enter the band's name." })
      .trim()
      .min(1, "Enter the band's name, like V or r′.")
      .max(16, "A band's name has at most 16 characters."),
    zeroPointPhotons: numberField("Zero point", { min: 0, max: 1e8, unit: "photons s⁻¹ cm⁻²", positive: true }),
    extinctionMagPerAirmass: numberField("Extinction", { min: 0, max: 3, unit: "mag/airmass" }),
    skyDarkMag: numberField("Dark sky", { min: 10, max: 26, unit: "mag/arcsec²" }),
    skyGreyMag: numberField("Grey sky", { min: 10, max: 26, unit: "mag/arcsec²" }),
    skyBrightMag: numberField("Bright sky", { min: 10, max: 26, unit: "mag/arcsec²" }),
  })
  .superRefine((f, ctx) => {
    // A brighter sky has a smaller magnitude per square arcsecond.
    if (f.skyGreyMag > f.skyDarkMag) {
      ctx.addIssue({ code: "custom", path: ["skyGreyMag"], message: "Grey sky cannot be darker (a larger number) than dark sky." });
    }
    if (f.skyBrightMag > f.skyGreyMag) {
      ctx.addIssue({ code: "custom", path: ["skyBrightMag"], message: "Bright sky cannot be darker (a larger number) than grey sky." });
    }
  });
export type FilterInput = z.infer<typeof filterSchema>;

// ---------------------------------------------------------------- calls

export const currencies = ["eur", "usd", "gbp", "chf"] as const;
export const MIN_SEMESTER_MONTHS = 3;
export const MAX_SEMESTER_MONTHS = 13;

/** The form field of one cell of the offered-hours grid. */
// no dots: react-hook-form would read `offer.1.dark` as a nested path
export const offerField = (telescopeId: number, moon: string) => `offer-${telescopeId}-${moon}`;
const offerPattern = new RegExp(`^offer-([1-9]\\d{0,9})-(${moonCategories.join("|")})$`);
const hoursField = numberField("Hours offered", { min: 0, max: 5000, unit: "h" });

const dateField = (label: string) =>
  z
    .string({ error: `Enter the ${label}.` })
    .trim()
    .min(1, `Enter the ${label}.`)
    .refine(isIsoDate, {
      message: `The ${label} is not a date (YYYY-MM-DD).`,
    });

const localDateTime = (label: string) =>
  z
    .string({ error: `Enter the ${label}.` })
    .trim()
    .min(1, `Enter the ${label} (date and time at the observatory).`);

const money = (label: string) =>
  numberField(label, { min: 0, max: 1e6 }).refine((v) => Math.abs(v * 100 - Math.round(v * 100)) < 1e-6, {
    message: `${label} has at most two decimals.`,
  });

// ---- distributed review (call options). Left out of a body (reviewMode absent), the call keeps
// what it had and a new call is panel-reviewed; with reviewMode present, an absent checkbox is "off".
const reviewOptionFields = {
  reviewMode: z.enum(reviewModes, "Choose who reviews the proposals.").optional(),
  reviewsPerSubmitter: z.preprocess(
    (value) => (value === undefined ? String(DEFAULT_REVIEWS_PER_SUBMITTER) : value),
    numberField("Reviews per submitting team", { min: 1, max: MAX_REVIEWS_PER_SUBMITTER, integer: true }),
  ),
  separateCompetitors: z.preprocess((value) => value === true || value === "on" || value === "true", z.boolean()),
  unreviewedPolicy: z.enum(unreviewedPolicies, "Choose what happens to a proposal whose team does not deliver its reviews.").default("flag"),
};
type ReviewOptions = { reviewMode: ReviewMode; reviewsPerSubmitter: number; separateCompetitors: boolean; unreviewedPolicy: UnreviewedPolicy };
const reviewOptionsOf = (call: Omit<ReviewOptions, "reviewMode"> & { reviewMode?: ReviewMode }): Partial<ReviewOptions> =>
  call.reviewMode
    ? { reviewMode: call.reviewMode, reviewsPerSubmitter: call.reviewsPerSubmitter, separateCompetitors: call.separateCompetitors, unreviewedPolicy: call.unreviewedPolicy }
    : {};

/**
 * The call form. Dates and times are typed as the observatory's wall clock (`timeZone`, which the
 * server sets to the observatory's zone); the result carries UTC instants. Cells of the offered-hours
 * grid are fields named `offer-<telescopeId>-<moon>`.
 */
export const callSchema = z
  .looseObject({
    semesterCode: z
      .string({ error: "Enter the semester code." })
      .trim()
      .toUpperCase()
      .regex(SEMESTER_CODE, "A semester code is the year and A or B, like 2027A."),
    title: name("title", 200).min(3, "Give the call a title of at least 3 characters."),
    timeZone: z.string().refine(isValidTimeZone, "The observatory's time zone is not set; set up a telescope first."),
    opensAt: localDateTime("opening"),
    deadlineAt: localDateTime("deadline"),
    semesterStart: dateField("semester start"),
    semesterEnd: dateField("semester end"),
    pageLimit: numberField("Page limit", { min: 1, max: 100, unit: "pages", integer: true }),
    currency: z.enum(currencies, "Choose the currency of the charges."),
    accessFee: money("Access fee"),
    pageCharge: money("Page charge"),
    teamVisibility: z.enum(teamVisibilities, "Choose whether reviewers see the team.").optional(),
    ...reviewOptionFields,
  })
  .transform((call, ctx) => {
    const opensAt = zonedLocalToUtc(call.opensAt, call.timeZone);
    const deadlineAt = zonedLocalToUtc(call.deadlineAt, call.timeZone);
    if (!opensAt) ctx.addIssue({ code: "custom", path: ["opensAt"], message: "The opening is not a date and time (YYYY-MM-DD HH:MM)." });
    if (!deadlineAt) ctx.addIssue({ code: "custom", path: ["deadlineAt"], message: "The deadline is not a date and time (YYYY-MM-DD HH:MM)." });
    const semesterStartsAt = startOfDateInZone(call.semesterStart, call.timeZone);
    if (opensAt && deadlineAt && opensAt >= deadlineAt) {
      ctx.addIssue({ code: "custom", path: ["deadlineAt"], message: "The deadline must come after the opening." });
    } else if (deadlineAt && semesterStartsAt && deadlineAt >= semesterStartsAt) {
      ctx.addIssue({ code: "custom", path: ["deadlineAt"], message: `The deadline must come before the semester starts (${call.semesterStart}).` });
    }
    if (call.semesterEnd <= call.semesterStart) {
      ctx.addIssue({ code: "custom", path: ["semesterEnd"], message: "The semester must end after it starts." });
    } else if (call.semesterEnd < addMonths(call.semesterStart, MIN_SEMESTER_MONTHS)) {
      ctx.addIssue({ code: "custom", path: ["semesterEnd"], message: `A semester lasts at least ${MIN_SEMESTER_MONTHS} months; this one is shorter.` });
    } else if (call.semesterEnd > addMonths(call.semesterStart, MAX_SEMESTER_MONTHS)) {
      ctx.addIssue({ code: "custom", path: ["semesterEnd"], message: `A semester lasts at most ${MAX_SEMESTER_MONTHS} months; this one is longer.` });
    }
    const offers: { telescopeId: number; moonCategory: (typeof moonCategories)[number]; hoursOffered: number }[] = [];
    for (const [key, value] of Object.entries(call)) {
      const match = offerPattern.exec(key);
      if (!match) continue;
      const parsed = hoursField.safeParse(value);
      if (!parsed.success) {
        ctx.addIssue({ code: "custom", path: [key], message: parsed.error.issues[0].message });
        continue;
      }
      offers.push({ telescopeId: Number(match[1]), moonCategory: match[2] as (typeof moonCategories)[number], hoursOffered: parsed.data });
    }
    if (offers.length && offers.every((o) => o.hoursOffered === 0)) {
      ctx.addIssue({ code: "custom", path: ["offers"], message: "Offer some hours on at least one telescope." });
    }
    return {
      semesterCode: call.semesterCode,
      title: call.title,
      opensAt: opensAt ?? new Date(Number.NaN),
      deadlineAt: deadlineAt ?? new Date(Number.NaN),
      semesterStart: call.semesterStart,
      semesterEnd: call.semesterEnd,
      pageLimit: call.pageLimit,
      currency: call.currency,
      accessFeePerHourCents: Math.round(call.accessFee * 100),
      pageChargeCents: Math.round(call.pageCharge * 100),
      // left out of a body, the call keeps what it had (a new call is named)
      ...(call.teamVisibility ? { teamVisibility: call.teamVisibility } : {}),
      ...reviewOptionsOf(call),
      offers,
    };
  });
export type CallInput = z.output<typeof callSchema>;

/** The call form as the office's action reads it: the wall clock is the observatory's, whatever the form says. */
export const callSchemaInZone = (timeZone: string) =>
  z.preprocess((fields) => (typeof fields === "object" && fields !== null ? { ...fields, timeZone } : fields), callSchema);

// ---------------------------------------------------------------- expected clear fraction per month

export const MONTH_NAMES = ["January", "February", "March", "April", "May", "June", "July", "August", "September", "October", "November", "December"] as const;

const clearPercent = (month: string) =>
  z.preprocess(
    // a month left out of the body is no month left empty: saving would delete it unasked
    (value) => (typeof value === "number" ? String(value) : value),
    z
      .string({ error: `${month}: missing from the form; reload the page and send all twelve months.` })
      .trim()
      .transform((text) => (text === "" ? null : /^[+-]?(\d+\.?\d*|\.\d+)$/.test(text) ? Number(text) : Number.NaN))
      .pipe(
        z
          .number({ error: `${month}: give the percentage of clear nights as a number, or leave it empty.` })
          .min(0, `${month}: from 0 to 100 %.`)
          .max(100, `${month}: from 0 to 100 %.`)
          // stored to a tenth of a percent: a finer value would be changed without a word
          .refine((n) => Math.abs(n * 10 - Math.round(n * 10)) < 1e-9, `${month}: give at most one decimal (62.5 %).`)
          .nullable(),
      ),
  );

/** The office's expected clear nights per month, in percent (empty = not set). Fields m1 … m12. */
export const clearFractionsSchema = z.object(
  Object.fromEntries(MONTH_NAMES.map((name, i) => [`m${i + 1}`, clearPercent(name)])) as Record<`m${number}`, ReturnType<typeof clearPercent>>,
);
export type ClearFractionsInput = z.output<typeof clearFractionsSchema>;

/** The call form's review options as the form holds them. */
export interface ReviewOptionValues {
  reviewMode: ReviewMode;
  reviewsPerSubmitter: number | string;
  separateCompetitors: boolean;
  unreviewedPolicy: UnreviewedPolicy;
}

/** The call form's values (what the page starts from and what comes back with a refusal). */
export interface CallFormValues extends ReviewOptionValues {
  semesterCode: string;
  title: string;
  /** wall clock at the observatory, YYYY-MM-DDTHH:MM */
  opensAt: string;
  deadlineAt: string;
  semesterStart: string;
  semesterEnd: string;
  pageLimit: number | string;
  currency: string;
  accessFee: number | string;
  pageCharge: number | string;
  offers: Record<number, Record<string, number>>;
  teamVisibility: TeamVisibility;
}
