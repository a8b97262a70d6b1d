import { z } from "zod";
import { allocationTiers, moonCategories } from "~/lib/domain";
import { idSchema } from "~/lib/forms";

/** A reason the audit log keeps: for a move on the board and for an unlock. */
export const reasonSchema = z.string().trim().min(3, "Give a reason of at least 3 characters.").max(500, "Keep the reason under 500 characters.");

/** The chair's position: 1 = top; null returns the proposal to its computed rank. */
export const chairRankSchema = z.number({ error: "Give a whole position from 1, or leave it empty for the computed rank." }).int("Give a whole position from 1.").min(1, "Positions start at 1.").max(10_000).nullable();

export const boardMoveSchema = z.object({
  proposalId: idSchema("proposal id"),
  chairRank: chairRankSchema,
  reason: reasonSchema,
});

export const allocationSchema = z.object({
  rows: z
    .array(
      z.object({
        proposalId: idSchema("proposal id"),
        telescopeId: idSchema("telescope id"),
        moonCategory: z.enum(moonCategories),
        semesterCode: z.string().trim().min(1).max(8),
        hours: z.number().min(0, "Hours cannot be negative.").max(5000, "More hours than a semester holds."),
      }),
    )
    .max(20_000),
  tiers: z
    .array(z.object({ proposalId: idSchema("proposal id"), tier: z.enum(allocationTiers).nullable(), waitlisted: z.boolean().optional() }))
    .max(5_000)
    .default([]),
});

export const unlockSchema = z.object({ reason: reasonSchema });
