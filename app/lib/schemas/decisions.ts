// Forms and bodies of the decisions (office page and API), shared by react-hook-form and the actions.
import { z } from "zod";
import { idSchema } from "~/lib/forms";
import { templateProblems } from "~/lib/decisions/template";
import { decisionOutcomes } from "~/lib/decisions/vocabulary";

const templateText = (what: string, max: number) =>
  z
    .string({ error: `The ${what} is required.` })
    .trim()
    .min(1, { error: `The ${what} is required.` })
    .max(max, { error: `The ${what} is at most ${max} characters.` })
    .superRefine((text, ctx) => {
      for (const message of templateProblems(text)) ctx.addIssue({ code: "custom", message });
    });

export const templateSchema = z.object({
  outcome: z.enum(decisionOutcomes, { error: "Choose accepted, waitlisted or declined." }),
  subject: templateText("subject", 200),
  body: templateText("letter", 20_000),
});

export const resendSchema = z.object({
  proposalId: idSchema("proposal"),
  reason: z.string({ error: "Say why the letter is sent again." }).trim().min(3, { error: "Say why the letter is sent again (at least 3 characters)." }).max(500, { error: "The reason is at most 500 characters." }),
});

export const decisionsIntent = z.discriminatedUnion(
  "intent",
  [
    z.object({ intent: z.literal("send-all") }),
    z.object({ intent: z.literal("resend") }).extend(resendSchema.shape),
    z.object({ intent: z.literal("save-template") }).extend(templateSchema.shape),
  ],
  { error: "That button does nothing here; reload the page." },
);

export const sendBodySchema = z.object({}).strict();
