// Forms and JSON bodies of the review, shared by the browser (react-hook-form) and the server.
import { z } from "zod";
import { idSchema } from "~/lib/forms";
import { scienceCategoryValues, wordCount } from "~/lib/proposals/vocabulary";
import { MERIT_MAX, MERIT_MIN, meritCriteria, PI_COMMENT_MIN_WORDS } from "~/lib/review/vocabulary";

/** A merit typed into the form or sent as JSON: 1–10 in half points; "" is "not given yet". */
function merit(label: string) {
  return z.union([z.string(), z.number(), z.null()]).optional().transform((raw, ctx): number | null => {
    const text = typeof raw === "number" ? String(raw) : (raw ?? "").trim();
    if (text === "") return null;
    const value = Number(text);
    if (!Number.isFinite(value)) {
      ctx.addIssue({ code: "custom", message: `${label} must be a number from ${MERIT_MIN} to ${MERIT_MAX}.` });
      return null;
    }
    if (value < MERIT_MIN || value > MERIT_MAX) ctx.addIssue({ code: "custom", message: `${label} must be from ${MERIT_MIN} to ${MERIT_MAX} (10 is best).` });
    else if (!Number.isInteger(value * 2)) ctx.addIssue({ code: "custom", message: `${label} goes in half points (like 7 or 7.5).` });
    return value;
  });
}

const flag = z.union([z.boolean(), z.string(), z.null()]).optional().transform((v) => v === true || v === "true" || v === "on" || v === "1");

/**
 * The review's merits and comments. A draft may be incomplete (what is given must still be valid); a submission needs
 * every merit and a comment to the PI of at least 50 words.
 */
export const gradeSchema = z
  .object({
    science: merit("Science"),
    feasibility: merit("Feasibility"),
    legacy: merit("Legacy value"),
    overall: merit("Overall merit"),
    commentToPi: z.string().max(20_000, "The comment to the PI is far too long.").optional().default("").transform((s) => s.trim()),
    commentToCommittee: z.union([z.string(), z.null()]).optional().transform((s) => (s ?? "").trim()).pipe(z.string().max(20_000, "The comment to the committee is far too long.")),
    submit: flag,
  })
  .superRefine((v, ctx) => {
    if (!v.submit) return;
    for (const c of meritCriteria) if (v[c.key] === null) ctx.addIssue({ code: "custom", path: [c.key], message: `Give ${c.label.toLowerCase()} a merit from 1 to 10 before submitting.` });
    const words = wordCount(v.commentToPi);
    if (words < PI_COMMENT_MIN_WORDS) {
      ctx.addIssue({ code: "custom", path: ["commentToPi"], message: `The comment to the PI needs at least ${PI_COMMENT_MIN_WORDS} words; it has ${words}.` });
    }
  });
export type GradeInput = z.input<typeof gradeSchema>;
export type GradeValues = z.output<typeof gradeSchema>;

export const conflictSchema = z.object({
  reason: z.string().trim().min(5, "Say in a few words why you have a conflict (at least 5 characters).").max(500, "Keep the reason under 500 characters."),
});

export const reviewerCategoriesSchema = z.object({
  categories: z
    .union([z.array(z.string()), z.string(), z.null()])
    .optional()
    .transform((v) => (Array.isArray(v) ? v : typeof v === "string" && v ? [v] : []))
    .pipe(z.array(z.enum(scienceCategoryValues, "Choose categories from the list."))),
});

const positiveId = z.number({ error: "must be a positive whole number" }).int("must be a positive whole number").positive("must be a positive whole number");

export const suggestSchema = z.object({
  perProposal: z.number({ error: "must be a whole number from 1 to 10" }).int("must be a whole number from 1 to 10").min(1, "must be at least 1").max(10, "must be at most 10").optional().default(3),
});

export const assignmentsSchema = z.object({
  assignments: z.array(z.object({ proposalId: positiveId, reviewerId: positiveId }).strip()).max(20_000, "too many pairs"),
  commit: z.boolean().optional().default(false),
});

export const reviewSetupSchema = z.object({
  reviewDeadline: z.string().trim().min(1, "Enter the review deadline.").regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/, "Enter the review deadline as date and time."),
  perProposal: z.coerce.number({ error: "Reviewers per proposal must be a number." }).int("Reviewers per proposal must be a whole number.").min(1, "At least one reviewer per proposal.").max(10, "At most 10 reviewers per proposal."),
  panel: z
    .union([z.array(z.string()), z.string(), z.null()])
    .optional()
    .transform((v) => (Array.isArray(v) ? v : typeof v === "string" && v ? [v] : []))
    .pipe(z.array(z.string().regex(/^\d{1,10}$/, "Choose the panel from the list.").transform(Number))),
});

/** The team's rating of one comment (decision tab). */
export const helpfulnessSchema = z.object({
  assignmentId: idSchema("comment", "Choose a comment to rate."),
  rating: z
    .string({ error: "Choose a rating from 1 to 5." })
    .regex(/^[1-5]$/, "Choose a rating from 1 (not helpful) to 5 (very helpful).")
    .transform(Number),
});
