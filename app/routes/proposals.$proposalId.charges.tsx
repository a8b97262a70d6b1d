import { redirect } from "react-router";
import { ChargesPanel } from "~/components/payments/ChargesPanel";
import { formAction, orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { idSchema, Refusal } from "~/lib/forms";
import { startCheckout } from "~/lib/payments/checkout.server";
import { chargesForTeam, declarePages, type CheckoutReturn } from "~/lib/payments/team.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { proposalChargesIntent } from "~/lib/schemas/charges";
import { Charge } from "~/models/index.server";
import type { Route } from "./+types/proposals.$proposalId.charges";

export function meta() {
  return [{ title: "Charges · Nightshare" }];
}

const SESSION_ID = /^cs_[A-Za-z0-9_]{1,200}$/;

/** What the page says after the payment page sent the PI back (`?checkout=return|left`). */
async function checkoutReturn(url: URL, proposalId: number): Promise<CheckoutReturn | null> {
  const how = url.searchParams.get("checkout");
  if (how === "left") {
    return { kind: "left", chargeId: idSchema("charge").safeParse(url.searchParams.get("charge")).data ?? null };
  }
  if (how !== "return") return null;
  const session = url.searchParams.get("session") ?? "";
  if (!SESSION_ID.test(session)) return { kind: "unknown" };
  const charge = await Charge.findOne({ where: { proposalId, checkoutSessionId: session } });
  if (!charge) return { kind: "unknown" };
  if (charge.state === "paid") return { kind: "paid", chargeId: charge.id };
  if (charge.state === "awaiting_payment" && charge.checkoutExpiresAt && charge.checkoutExpiresAt > new Date()) return { kind: "waiting", chargeId: charge.id };
  return { kind: "lapsed", chargeId: charge.id };
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  // the return first, the charges after: a payment confirmed in between shows as paid in the table
  // while the notice still waits (and polls), never as "paid" above a row that is not
  const returned = await checkoutReturn(new URL(request.url), proposalId);
  const view = await orNotFound(chargesForTeam({ user, proposalId }));
  return { ...view, proposalId, returned };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await orNotFound(getProposalForUser({ proposalId, user }));
  return formAction(request, proposalChargesIntent, async (input) => {
    switch (input.intent) {
      case "declare-pages": {
        const charge = await declarePages({ user, proposalId, pages: input.pages });
        return { ok: true as const, intent: input.intent, message: `Page charge raised for ${charge.pages} pages.` };
      }
      case "pay": {
        const own = await Charge.findOne({ where: { id: input.chargeId, proposalId }, attributes: ["id"] });
        if (!own) throw new Refusal("There is no such charge on this proposal.", { status: 404, field: "chargeId" });
        const { url } = await startCheckout({ user, chargeId: input.chargeId });
        return redirect(url);
      }
    }
  });
}

export default function Charges({ loaderData, actionData }: Route.ComponentProps) {
  return <ChargesPanel data={loaderData} answer={actionData ?? null} />;
}
