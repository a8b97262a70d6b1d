// One executed or lost epoch, as the API, the office's form and each night-log row give it.
// Shared by the browser (the form's resolver) and the server.
import { z } from "zod";
import { lostCauses } from "~/lib/domain";
import { idSchema } from "~/lib/forms";

/** A number given as a number or as decimal text; "" and null are "not given". */
function optionalNumber(field: string, min: number, max: number, unit: string) {
  const message = `${field} must be a number above ${min} and at most ${max}${unit}.`;
  return z.preprocess(
    (v) => (v === "" || v === null ? undefined : typeof v === "string" && /^\s*[+-]?(\d+\.?\d*|\.\d+)\s*$/.test(v) ? Number(v) : v),
    z.number({ error: message }).gt(min, { error: message }).max(max, { error: message }).optional(),
  );
}

/**
 * `YYYY-MM-DDTHH:MM[:SS[.sss]]` with `Z` or an offset, or without a zone (then UTC); a space for
 * the `T` too. Night logs keep UTC.
 */
const OBSERVED_AT = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.(\d{1,3}))?)?(Z|[+-]\d{2}:\d{2})?$/;

export function parseObservedAt(text: string): Date | null {
  const m = OBSERVED_AT.exec(text.trim());
  if (!m) return null;
  const [, y, mo, d, h, mi, s] = m;
  const check = new Date(Date.UTC(+y, +mo - 1, +d, +h, +mi, s ? +s : 0));
  if (check.getUTCFullYear() !== +y || check.getUTCMonth() !== +mo - 1 || check.getUTCDate() !== +d || +h > 23 || +mi > 59 || (s && +s > 59)) return null;
  const zone = m[8];
  const iso = `${text.trim().replace(" ", "T")}${zone ? "" : "Z"}`;
  const t = Date.parse(iso);
  return Number.isFinite(t) ? new Date(t) : null;
}

export const OBSERVED_AT_HINT = "a date and UTC time, e.g. 2026-11-03T02:41 (or with Z / an offset)";

export const epochRecordSchema = z
  .object({
    observationId: idSchema("observation", "observationId must be the id of one of the programme's astrometric observations.").optional(),
    observedAt: z.string({ error: `observedAt must be ${OBSERVED_AT_HINT}.` }).max(40, { error: `observedAt must be ${OBSERVED_AT_HINT}.` }),
    telescopeId: idSchema("telescope", "telescopeId must be the id of a telescope."),
    frames: z.preprocess(
      (v) => (typeof v === "string" && /^\s*\d{1,6}\s*$/.test(v) ? Number(v) : v),
      z.number({ error: "frames must be a whole number from 0 to 10000." }).int({ error: "frames must be a whole number from 0 to 10000." }).min(0, { error: "frames must be a whole number from 0 to 10000." }).max(10_000, { error: "frames must be a whole number from 0 to 10000." }),
    ),
    fwhmArcsec: optionalNumber("fwhmArcsec", 0, 20, "″"),
    precisionMas: optionalNumber("precisionMas", 0, 10_000, " mas"),
    snr: optionalNumber("snr", 0, 1_000_000, ""),
    lost: z.object({ cause: z.enum(lostCauses, { error: "lost.cause must be weather or technical." }) }, { error: "lost must be { cause: weather | technical }." }).strict().optional(),
    note: z.string({ error: "note must be text." }).max(500, { error: "note must be at most 500 characters." }).optional(),
  })
  .strict()
  .superRefine((v, ctx) => {
    const at = parseObservedAt(v.observedAt);
    if (!at) ctx.addIssue({ code: "custom", path: ["observedAt"], message: `observedAt must be ${OBSERVED_AT_HINT}.` });
    else if (at.getTime() > Date.now() + 60 * 60 * 1000) ctx.addIssue({ code: "custom", path: ["observedAt"], message: "observedAt is in the future: record an epoch after it was taken." });
    if (v.lost) return;
    if (v.frames < 1) ctx.addIssue({ code: "custom", path: ["frames"], message: "frames must be at least 1 for an executed epoch (a lost one may have 0)." });
    if (v.precisionMas !== undefined && v.snr !== undefined) {
      ctx.addIssue({ code: "custom", path: ["snr"], message: "Give precisionMas or snr, not both: the precision is either measured or derived from the FWHM and the SNR." });
    } else if (v.precisionMas === undefined) {
      if (v.snr === undefined) ctx.addIssue({ code: "custom", path: ["precisionMas"], message: "precisionMas is required for an executed epoch, unless snr and fwhmArcsec are given to derive it." });
      else if (v.fwhmArcsec === undefined) ctx.addIssue({ code: "custom", path: ["fwhmArcsec"], message: "fwhmArcsec is required to derive the precision from the SNR." });
    }
  });

export type EpochRecordInput = z.output<typeof epochRecordSchema>;

/** The office's form: the same fields, flat (lost as a select), turned into the API's shape. */
export function formToRecord(values: Record<string, unknown>) {
  const { lostCause, observationId, note, ...rest } = values;
  return {
    ...rest,
    ...(observationId !== undefined && observationId !== "" ? { observationId } : {}),
    ...(typeof note === "string" && note.trim() !== "" ? { note: note.trim() } : {}),
    ...(lostCause !== undefined && lostCause !== "" ? { lost: { cause: lostCause } } : {}),
  };
}

/** The PI's acceptance of a re-plan (the Epoch progress tab's "accept-replan" button). */
export const replanAcceptSchema = z.object({
  observationId: idSchema("observation"),
  /** the re-plan's dates the PI saw (YYYY-MM-DD, comma separated); accepted only if still the same */
  dates: z.string().max(2000).regex(/^(\d{4}-\d{2}-\d{2})(,\d{4}-\d{2}-\d{2})*$/, { error: "dates must be the re-plan's dates, YYYY-MM-DD separated by commas." }),
});

/** The office's form (flat fields, `lostCause` a select) checked as the API's body. */
const formText = (field: string) => z.string({ error: `${field} must be text.` }).optional();

/** Its fields are text, each optional here (the record's schema names a missing one); other fields are dropped. */
export const epochFormSchema = z
  .object({
    observationId: formText("observationId"),
    observedAt: formText("observedAt"),
    telescopeId: formText("telescopeId"),
    frames: formText("frames"),
    fwhmArcsec: formText("fwhmArcsec"),
    snr: formText("snr"),
    precisionMas: formText("precisionMas"),
    lostCause: formText("lostCause"),
    note: formText("note"),
  })
  .transform((fields) => formToRecord(fields))
  .pipe(epochRecordSchema);
export type EpochFormFields = Required<z.input<typeof epochFormSchema>>;

/** A form field's error key for an issue path of epochRecordSchema. */
export function formFieldOf(path: string) {
  return path === "lost.cause" || path === "lost" ? "lostCause" : path;
}
