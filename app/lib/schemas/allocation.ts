import { z } from "zod";
import { allocationTiers, moonCategories } from "~/lib/domain";
import { idSchema } from "~/lib/forms";

/** A reason the audit log keeps: for a move on the board and for an unlock. */
export const reasonSchema = z.string().trim().min(3, "Give a reason of at least 3 characters.").max(500, "Keep the reason under 500 characters.");

/** The chair's position: 1 = top; null returns the proposal to its computed rank. */
export const chairRankSchema = z.number({ error: "Give a whole position from 1, or leave it empty for the computed rank." }).int("Give a whole position from 1.").min(1, "Positions start at 1.").max(10_000).nullable();

// The API's bodies take only their own fields: anything else (the hand-set flags and who set a
// position, `allocatedByHand`, `allocatedByHandById`, `chairRankById`, are the server's to set)
// is a 400 naming it, not silently dropped.
export const boardMoveSchema = z
  .object({
    proposalId: idSchema("proposal id"),
    chairRank: chairRankSchema,
    reason: reasonSchema,
  })
  .strict();

export const allocationSchema = z.object({
  rows: z
    .array(
      z.object({
        proposalId: idSchema("proposal id"),
        telescopeId: idSchema("telescope id"),
        moonCategory: z.enum(moonCategories),
        semesterCode: z.string().trim().min(1).max(8),
        hours: z.number().min(0, "Hours cannot be negative.").max(5000, "More hours than a semester holds."),
      }).strict(),
    )
    .max(20_000),
  tiers: z
    .array(z.object({ proposalId: idSchema("proposal id"), tier: z.enum(allocationTiers).nullable(), waitlisted: z.boolean().optional() }).strict())
    .max(5_000)
    .default([]),
}).strict();

export const unlockSchema = z.object({ reason: reasonSchema });

/** Fill by rank's one choice: also refill the proposals whose hours the chair set by hand. */
export const fillSchema = z.object({ replaceHandSet: z.boolean({ error: "replaceHandSet must be true or false." }).default(false) }).strict();

const blankToNull = (v: unknown) => (v === "" || v === undefined ? null : v);
const hoursField = z.preprocess(
  (v) => (typeof v === "string" ? (v.trim() === "" ? 0 : Number(v.trim())) : v),
  z.number({ error: "Give the hours as a number." }).finite("Give the hours as a number.").min(0, "Hours cannot be negative.").max(5000, "More hours than a semester holds."),
);

/**
 * The allocation page's form: one row per proposal in the board's order, its tier, whether it is
 * waitlisted, and its hours per telescope × moon category × semester. The page checks it in the
 * browser (zodResolver) and the action checks it again; the paths are the form's field names.
 */
export const allocationSheetSchema = z.object({
  intent: z.literal("save", { error: "That button does nothing here; reload the page." }),
  /** the allocation's version the page was read at (`allocationVersion`); a later save makes this one a 409 */
  basedOn: z.number().int().min(0).max(2 ** 53).optional(),
  rows: z
    .array(
      z
        .object({
          proposalId: idSchema("proposal id"),
          tier: z.preprocess(blankToNull, z.enum(allocationTiers, { error: "Choose assured, queue or filler." }).nullable()),
          waitlisted: z.boolean().default(false),
          cells: z
            .array(
              z.object({
                telescopeId: idSchema("telescope id"),
                moonCategory: z.enum(moonCategories),
                semesterCode: z.string().trim().min(1).max(8),
                hours: hoursField,
              }),
            )
            .max(200),
        })
        .superRefine((row, ctx) => {
          const hours = row.cells.reduce((s, c) => s + (Number.isFinite(c.hours) ? c.hours : 0), 0);
          if (hours > 0 && row.tier === null) ctx.addIssue({ code: "custom", path: ["tier"], message: "Give a tier to a proposal with hours." });
          if (hours > 0 && row.waitlisted) ctx.addIssue({ code: "custom", path: ["waitlisted"], message: "A waitlisted proposal has no hours: set them to 0 or untick." });
          if (hours === 0 && row.tier !== null) ctx.addIssue({ code: "custom", path: ["tier"], message: "A tier needs hours; give hours or choose no tier." });
        }),
    )
    .max(5_000),
});
export type AllocationSheetInput = z.input<typeof allocationSheetSchema>;
export type AllocationSheet = z.output<typeof allocationSheetSchema>;
