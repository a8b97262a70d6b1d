import { z } from "zod";
import { grantableRoles } from "~/lib/domain";

export const roleChangeSchema = z.object({
  intent: z.enum(["grant", "revoke"], "Choose grant or revoke."),
  userId: z.coerce.number().int().positive("Choose a user."),
  role: z.enum(grantableRoles, "Choose reviewer, chair or admin."),
});
