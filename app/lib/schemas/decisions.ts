// Forms and bodies of the decisions (office page and API), shared by react-hook-form and the actions.
import { z } from "zod";
import { idSchema, type ActionFailure } from "~/lib/forms";
import { templateProblems } from "~/lib/decisions/template";
import { decisionOutcomes, type DecisionOutcome } from "~/lib/decisions/vocabulary";

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

/** What the office's decisions page answers: a sending, a letter sent again, a template saved (its outcome says which editor), or a refusal. */
export type DecisionsAnswer =
  | ActionFailure
  | { ok: true; intent: "send-all" | "resend"; message: string }
  | { ok: true; intent: "save-template"; outcome: DecisionOutcome; message: string };

export const sendBodySchema = z.object({}).strict();
