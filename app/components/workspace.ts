import { useRouteLoaderData } from "react-router";
import type { WorkspaceHeader } from "~/lib/proposals/proposals.server";

/** The workspace layout's data (proposal header, role, editability), for the tabs below it. */
export function useWorkspace(): WorkspaceHeader {
  return (useRouteLoaderData("routes/proposals.$proposalId") as { proposal: WorkspaceHeader }).proposal;
}

