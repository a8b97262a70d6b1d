// The workspace's URL id, shared by its loaders and actions.
import { idParam } from "../actions.server";

/** The :proposalId of the URL as a number; anything else is the 404 page (a proposal that does not exist). */
export function proposalIdParam(params: { proposalId?: string }): number {
  return idParam(params.proposalId, "proposal");
}
