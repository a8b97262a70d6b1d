import type { z } from "zod";
import type { ActionFailure } from "~/lib/forms";
import type { InstrumentOption, ObservationRow } from "~/lib/proposals/observations.server";
import type { observationSchema } from "~/lib/schemas/proposals";

/** What the Observations tab's action answers, for the forms' fetchers. */
export type ObservationActionResult = ActionFailure | { ok: true; intent: "create" | "update" | "delete"; message: string };

/** The observation form's fields as typed. */
export type ObservationFields = z.input<typeof observationSchema>;

/** What the Observations tab's loader gives the form. */
export type ObservationPageData = {
  observations: ObservationRow[];
  options: InstrumentOption[];
  targets: { id: number; name: string; magnitude: number | null; band: string | null }[];
};
