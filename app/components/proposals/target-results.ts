import type { ActionFailure } from "~/lib/forms";
import type { CsvReport } from "~/lib/proposals/target-csv";

/** What the Targets tab's action answers, for the forms' fetchers. */
export type TargetActionResult =
  | ActionFailure
  | { ok: true; intent: "create" | "update" | "delete"; message: string }
  | { ok: true; intent: "import"; saved: number; report: CsvReport; remaining: string };
