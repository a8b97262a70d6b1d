// The charges' forms, shared by the browser (react-hook-form's zodResolver) and the actions.
import { z } from "zod";
import { idSchema } from "~/lib/forms";

/** Pages of the data-release paper: a whole number; a paper longer than 500 pages is a typo. */
export const pagesSchema = z.preprocess(
  (v) => (typeof v === "string" && /^\s*\d{1,6}\s*$/.test(v) ? Number(v) : v),
  z.number({ error: "Give the number of pages as a whole number." }).int("Give the number of pages as a whole number.").min(1, "A paper has at least 1 page.").max(500, "At most 500 pages; check the number."),
);

export const declarePagesSchema = z.object({ intent: z.literal("declare-pages"), pages: pagesSchema });

/** The PI's actions on /proposals/:id/charges. No amount: the server computes every amount. */
export const proposalChargesIntent = z.discriminatedUnion(
  "intent",
  [declarePagesSchema, z.object({ intent: z.literal("pay"), chargeId: idSchema("charge") })],
  { error: "That button does nothing here; reload the page." },
);

export const waiveReasonSchema = z.string().trim().min(3, "Give a reason of at least 3 characters.").max(500, "Keep the reason under 500 characters.");

export const waiveSchema = z.object({ intent: z.literal("waive"), chargeId: idSchema("charge"), reason: waiveReasonSchema });
