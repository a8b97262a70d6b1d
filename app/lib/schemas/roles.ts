import { z } from "zod";
import { grantableRoles } from "~/lib/domain";
import { idSchema } from "~/lib/forms";

export const userIdField = idSchema("user", "Choose a user.");
export const roleField = z.enum(grantableRoles, "Choose reviewer, chair, admin or observer.");

export const roleChangeSchema = z.object({
  intent: z.enum(["grant", "revoke"], "Choose grant or revoke."),
  userId: userIdField,
  role: roleField,
});

/** The admin's actions on one person: a role change, or ending all their sessions. */
export const adminUserActionSchema = z.discriminatedUnion(
  "intent",
  [
    roleChangeSchema,
    z.object({
      intent: z.literal("sign-out-everywhere"),
      userId: userIdField,
    }),
  ],
  { error: "Choose grant, revoke or sign-out-everywhere." },
);
