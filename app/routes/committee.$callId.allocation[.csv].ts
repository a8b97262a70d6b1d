import { allocationCsv } from "~/lib/allocation/exports.server";
import { csvDownload } from "~/lib/http/download.server";
import { idParam } from "~/lib/actions.server";
import { requireRole } from "~/lib/auth/auth.server";
import type { Route } from "./+types/committee.$callId.allocation[.csv]";

/** The allocation as CSV: one line per proposal × telescope × moon category × semester (chair). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireRole(request, "chair");
  return csvDownload(allocationCsv({ callId: idParam(params.callId, "call"), chair: user }));
}
