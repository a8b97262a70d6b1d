import { z } from "zod";
import { grantableRoles } from "~/lib/domain";
import { idSchema } from "~/lib/forms";

export const roleChangeSchema = z.object({
  intent: z.enum(["grant", "revoke"], "Choose grant or revoke."),
  userId: idSchema("user", "Choose a user."),
  role: z.enum(grantableRoles, "Choose reviewer, chair or admin."),
});
