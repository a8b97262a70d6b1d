import { z } from "zod";

/** Body of POST /api/v1/calls/:callId/semester-check (shared with the board's form). */
export const semesterCheckSchema = z
  .strictObject({
    realisations: z.number({ error: "must be a whole number from 1 to 1000" }).int("must be a whole number from 1 to 1000").min(1, "must be at least 1").max(1000, "must be at most 1000").default(200),
    seed: z.number({ error: "must be a whole number from 0 to 4294967295" }).int("must be a whole number from 0 to 4294967295").min(0, "must be at least 0").max(4_294_967_295, "must be at most 4294967295").default(1),
  }, { error: (issue) => (issue.code === "unrecognized_keys" ? `unknown field${issue.keys.length > 1 ? "s" : ""}: ${issue.keys.join(", ")}` : undefined) });
export type SemesterCheckBody = z.output<typeof semesterCheckSchema>;
