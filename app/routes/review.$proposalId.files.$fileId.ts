import { orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { sandboxedFilePolicy } from "~/lib/http/download.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { withoutAuthorship } from "~/lib/review/anonymity.server";
import { ANONYMOUS_FILENAME, committeeFile } from "~/lib/review/read.server";
import type { Route } from "./+types/review.$proposalId.files.$fileId";

/** A stored file (the science case) for the committee; 404 for anyone else and for other proposals' files. */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const fileId = /^\d{1,10}$/.test(params.fileId) ? Number(params.fileId) : 0;
  const { file, hideTeam } = await orNotFound(committeeFile({ user, proposalId, fileId }));
  const inline = new URL(request.url).searchParams.get("inline") === "1";
  // dual-anonymous: a neutral file name and no authorship metadata
  const filename = hideTeam ? ANONYMOUS_FILENAME : file.filename;
  const bytes = hideTeam && file.contentType === "application/pdf" ? await withoutAuthorship(new Uint8Array(file.data)) : new Uint8Array(file.data);
  const ascii = filename.replace(/[^\x20-\x7e]/g, "_").replace(/["\\]/g, "_");
  // Sandboxed like the team's route (no script of the file runs in our origin, whatever the file
  // holds). The inline answer is the science case that the review page frames (front-rules.ts
  // framedBySameOrigin), so its policy lets our own pages frame it; Chromium's PDF viewer shows a
  // sandboxed PDF in that frame (tests/e2e/science-case-frame.test.ts).
  return new Response(Buffer.from(bytes), {
    headers: {
      "Content-Type": file.contentType,
      "Content-Length": String(bytes.byteLength),
      "Content-Disposition": `${inline ? "inline" : "attachment"}; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(filename)}`,
      "X-Content-Type-Options": "nosniff",
      "Content-Security-Policy": sandboxedFilePolicy(inline ? "'self'" : "'none'"),
      "Cache-Control": "private, no-store",
    },
  });
}
