import { csvResponse } from "~/lib/allocation/download.server";
import { rankedListCsv } from "~/lib/allocation/exports.server";
import { requireRole } from "~/lib/auth/auth.server";
import { pageCallId } from "~/lib/review/chair.server";
import type { Route } from "./+types/committee.$callId.ranked-list[.csv]";

/** The ranked list as CSV, in the board's order (chair). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  const { filename, csv } = await rankedListCsv({ callId: pageCallId(params) });
  return csvResponse(filename, csv);
}
