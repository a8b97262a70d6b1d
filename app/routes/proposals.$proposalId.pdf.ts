import { orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { proposalPdfForUser } from "~/lib/proposals/submit.server";
import type { Route } from "./+types/proposals.$proposalId.pdf";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const { bytes, filename } = await orNotFound(proposalPdfForUser({ user, proposalId: proposalIdParam(params) }));
  return new Response(Buffer.from(bytes), {
    headers: {
      "Content-Type": "application/pdf",
      "Content-Disposition": `attachment; filename="${filename}"`,
      "Content-Length": String(bytes.byteLength),
      "Cache-Control": "private, no-store",
      "X-Content-Type-Options": "nosniff",
      "Content-Security-Policy": "sandbox; default-src 'none'",
    },
  });
}
