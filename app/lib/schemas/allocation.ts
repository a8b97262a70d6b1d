import { z } from "zod";
import { allocationTiers, moonCategories } from "~/lib/domain";
import { idSchema } from "~/lib/forms";

const reason = z.string().trim().min(3, "Give a reason of at least 3 characters.").max(500, "Keep the reason under 500 characters.");

export const boardMoveSchema = z.object({
  proposalId: idSchema("proposal id"),
  chairRank: z.number().int().min(1, "Positions start at 1.").max(10_000).nullable(),
  reason,
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

export const unlockSchema = z.object({ reason });
