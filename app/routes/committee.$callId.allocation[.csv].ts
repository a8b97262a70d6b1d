import { allocationCsv } from "~/lib/allocation/exports.server";
import { csvResponse, refusalText } from "~/lib/allocation/download.server";
import { idParam } from "~/lib/actions.server";
import { requireRole } from "~/lib/auth/auth.server";
import type { Route } from "./+types/committee.$callId.allocation[.csv]";

/** The allocation as CSV: one line per proposal × telescope × moon category × semester (chair). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  const callId = idParam(params.callId, "call");
  try {
    const { filename, csv } = await allocationCsv({ callId });
    return csvResponse(filename, csv);
  } catch (error) {
    return refusalText(error);
  }
}
