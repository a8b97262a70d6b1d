import { downloadResponse, refusalText } from "~/lib/http/download.server";
import { epochsIcs } from "~/lib/allocation/exports.server";
import { idParam } from "~/lib/actions.server";
import { requireRole } from "~/lib/auth/auth.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import type { Route } from "./+types/committee.$callId.proposals.$proposalId.epochs[.ics]";

/** An accepted programme's planned epochs as iCalendar (RFC 5545) (chair). */
export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  const callId = idParam(params.callId, "call");
  try {
    const { filename, ics } = await epochsIcs({ callId, proposalId: proposalIdParam(params) });
    return downloadResponse(filename, "text/calendar; charset=utf-8", ics);
  } catch (error) {
    return refusalText(error);
  }
}
