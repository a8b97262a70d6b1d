import { data } from "react-router";
import { orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { idSchema } from "~/lib/forms";
import { receiptPdfOfCharge } from "~/lib/payments/receipt.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import type { Route } from "./+types/proposals.$proposalId.charges.$chargeId.receipt[.pdf]";

/** The receipt of a paid charge, for the proposal's team (404 for anyone else and unpaid charges). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await orNotFound(getProposalForUser({ proposalId, user }));
  const chargeId = idSchema("charge").safeParse(params.chargeId);
  const receipt = chargeId.success ? await orNotFound(receiptPdfOfCharge({ chargeId: chargeId.data, proposalId })) : null;
  if (!receipt) throw data({ message: "There is no receipt at this address: the charge is not paid, or not this proposal's." }, { status: 404 });
  return new Response(Buffer.from(receipt.pdf), {
    headers: {
      "Content-Type": "application/pdf",
      "Content-Disposition": `attachment; filename="${receipt.filename}"`,
      "Content-Length": String(receipt.pdf.byteLength),
      "Cache-Control": "private, no-store",
      "X-Content-Type-Options": "nosniff",
      "Content-Security-Policy": "sandbox; default-src 'none'",
    },
  });
}
