import { z } from "zod";
import { grantableRoles } from "~/lib/domain";
import { idSchema } from "~/lib/forms";

export const roleChangeSchema = z.object({
  intent: z.enum(["grant", "revoke"], "Choose grant or revoke."),
  userId: idSchema("user", "Choose a user."),
  role: z.enum(grantableRoles, "Choose reviewer, chair, admin or observer."),
});

/** The admin's actions on one person: a role change, or ending all their sessions. */
export const adminUserActionSchema = z.discriminatedUnion(
  "intent",
  [
    roleChangeSchema,
    z.object({
      intent: z.literal("sign-out-everywhere"),
      userId: idSchema("user", "Choose a user."),
    }),
  ],
  { error: "Choose grant, revoke or sign-out-everywhere." },
);
