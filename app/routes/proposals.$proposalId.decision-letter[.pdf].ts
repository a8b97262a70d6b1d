import { data } from "react-router";
import { orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { letterRowForUser } from "~/lib/decisions/decisions.server";
import { buildLetterPdf } from "~/lib/decisions/letter-pdf.server";
import { letterFileName } from "~/lib/decisions/render-mail.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import type { Route } from "./+types/proposals.$proposalId.decision-letter[.pdf]";

/** The decision letter as a PDF for the PI and Co-Is (404 before it is sent, or for anyone else). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const letter = await orNotFound(letterRowForUser({ user, proposalId: proposalIdParam(params) }));
  if (!letter) throw data({ message: "No decision has been sent for this proposal yet." }, { status: 404 });
  const bytes = await buildLetterPdf(letter);
  return new Response(Buffer.from(bytes), {
    headers: {
      "Content-Type": "application/pdf",
      "Content-Disposition": `attachment; filename="${letterFileName(letter.facts.code)}"`,
      "Content-Length": String(bytes.byteLength),
      "Cache-Control": "private, no-store",
      "X-Content-Type-Options": "nosniff",
      "Content-Security-Policy": "sandbox; default-src 'none'",
    },
  });
}
