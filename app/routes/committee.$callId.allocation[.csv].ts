import { allocationCsv } from "~/lib/allocation/exports.server";
import { csvResponse } from "~/lib/allocation/download.server";
import { requireRole } from "~/lib/auth/auth.server";
import { pageCallId } from "~/lib/review/chair.server";
import type { Route } from "./+types/committee.$callId.allocation[.csv]";

/** The allocation as CSV: one line per proposal × telescope × moon category × semester (chair). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  const { filename, csv } = await allocationCsv({ callId: pageCallId(params) });
  return csvResponse(filename, csv);
}
