import { data, redirect } from "react-router";
import { ChargesPanel } from "~/components/payments/ChargesPanel";
import { requireUser } from "~/lib/auth/auth.server";
import { fieldErrors, readForm } from "~/lib/forms";
import { startCheckout } from "~/lib/payments/checkout.server";
import { chargesForTeam, declarePages } from "~/lib/payments/team.server";
import { formValues, proposalIdParam, refusalResponse } from "~/lib/proposals/routes.server";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { proposalChargesIntent } from "~/lib/schemas/charges";
import { Charge } from "~/models/index.server";
import type { Route } from "./+types/proposals.$proposalId.charges";

export function meta() {
  return [{ title: "Charges · Nightshare" }];
}

const SESSION_ID = /^cs_[A-Za-z0-9_]{1,200}$/;

export type CheckoutReturn =
  | { kind: "paid"; chargeId: number }
  | { kind: "waiting"; chargeId: number }
  | { kind: "lapsed"; chargeId: number }
  | { kind: "left"; chargeId: number | null }
  | { kind: "unknown" };

/** What the page says after the payment page sent the PI back (`?checkout=return|left`). */
async function checkoutReturn(url: URL, proposalId: number): Promise<CheckoutReturn | null> {
  const how = url.searchParams.get("checkout");
  if (how === "left") {
    const id = Number(url.searchParams.get("charge"));
    return { kind: "left", chargeId: Number.isSafeInteger(id) && id > 0 ? id : null };
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
  const view = await chargesForTeam({ user, proposalId });
  return { ...view, proposalId, returned: await checkoutReturn(new URL(request.url), proposalId) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await getProposalForUser({ proposalId, user });
  const values = formValues(await readForm(request));
  const parsed = proposalChargesIntent.safeParse(values);
  if (!parsed.success) {
    const errors = fieldErrors(parsed.error);
    return data({ ok: false as const, intent: String(values.intent ?? ""), errors: errors.intent ? { form: errors.intent } : errors, values, message: "" }, { status: 400 });
  }
  const body = parsed.data;
  try {
    if (body.intent === "declare-pages") {
      const charge = await declarePages({ user, proposalId, pages: body.pages });
      return { ok: true as const, intent: body.intent, errors: {} as Record<string, string>, values, message: `Page charge raised for ${charge.pages} pages.` };
    }
    const own = await Charge.findOne({ where: { id: body.chargeId, proposalId }, attributes: ["id"] });
    if (!own) return data({ ok: false as const, intent: body.intent, errors: { chargeId: "There is no such charge on this proposal." }, values, message: "" }, { status: 404 });
    const { url } = await startCheckout({ user, chargeId: body.chargeId });
    return redirect(url);
  } catch (error) {
    const refused = refusalResponse(error, values);
    return data({ ...refused.data, intent: body.intent, message: "" }, { status: refused.init?.status ?? 400 });
  }
}

export default function Charges({ loaderData, actionData }: Route.ComponentProps) {
  return <ChargesPanel data={loaderData} answer={actionData ?? null} />;
}
