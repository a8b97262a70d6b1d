import { csvDownload } from "~/lib/http/download.server";
import { rankedListCsv } from "~/lib/allocation/exports.server";
import { idParam } from "~/lib/actions.server";
import { requireRole } from "~/lib/auth/auth.server";
import type { Route } from "./+types/committee.$callId.ranked-list[.csv]";

/** The ranked list as CSV, in the board's order (chair). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireRole(request, "chair");
  return csvDownload(rankedListCsv({ callId: idParam(params.callId, "call"), chair: user }));
}
