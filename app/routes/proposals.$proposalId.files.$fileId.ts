import { orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { idSchema } from "~/lib/forms";
import { sandboxedFilePolicy } from "~/lib/http/download.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { getProposalFileForUser } from "~/lib/proposals/science-case.server";
import type { Route } from "./+types/proposals.$proposalId.files.$fileId";

/** A stored file of the proposal, for its team only (404 for anyone else and for other proposals' files). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const fileId = idSchema("file").safeParse(params.fileId).data ?? 0;
  const file = await orNotFound(getProposalFileForUser({ proposalId, fileId, user }));
  const inline = new URL(request.url).searchParams.get("inline") === "1";
  const ascii = file.filename.replace(/[^\x20-\x7e]/g, "_").replace(/["\\]/g, "_");
  return new Response(new Uint8Array(file.data), {
    headers: {
      "Content-Type": file.contentType,
      "Content-Length": String(file.sizeBytes),
      "Content-Disposition": `${inline ? "inline" : "attachment"}; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(file.filename)}`,
      "X-Content-Type-Options": "nosniff",
      // Shown inline, the file is its own sandboxed origin: no scripts, no access to our cookies.
      "Content-Security-Policy": sandboxedFilePolicy(),
      "Cache-Control": "private, no-store",
      ETag: `"${file.sha256}"`,
    },
  });
}
