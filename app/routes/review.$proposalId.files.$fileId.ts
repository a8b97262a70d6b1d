import { requireUser } from "~/lib/auth.server";
import { proposalIdParam } from "~/lib/proposal-routes.server";
import { committeeFile } from "~/lib/review/read.server";
import type { Route } from "./+types/review.$proposalId.files.$fileId";

/** A stored file (the science case) for the committee; 404 for anyone else and for other proposals' files. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const fileId = /^\d{1,10}$/.test(params.fileId) ? Number(params.fileId) : 0;
  const file = await committeeFile({ user, proposalId, fileId });
  const inline = new URL(request.url).searchParams.get("inline") === "1";
  const ascii = file.filename.replace(/[^\x20-\x7e]/g, "_").replace(/["\\]/g, "_");
  return new Response(new Uint8Array(file.data), {
    headers: {
      "Content-Type": file.contentType,
      "Content-Length": String(file.sizeBytes),
      "Content-Disposition": `${inline ? "inline" : "attachment"}; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(file.filename)}`,
      "X-Content-Type-Options": "nosniff",
      "Cache-Control": "private, no-store",
    },
  });
}
