import { z } from "zod";
import { OfficeCharges } from "~/components/payments/OfficeCharges";
import { formAction, intent } from "~/lib/actions.server";
import { requireRole } from "~/lib/auth/auth.server";
import { allCharges, waiveCharge } from "~/lib/payments/office.server";
import { waiveSchema } from "~/lib/schemas/charges";
import type { Route } from "./+types/admin.charges";

export function meta() {
  return [{ title: "Charges · Office · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  return { charges: await allCharges() };
}

const chargesIntents = z.discriminatedUnion("intent", [intent("waive", waiveSchema.omit({ intent: true }))]);

export async function action({ request }: Route.ActionArgs) {
  const user = await requireRole(request, "admin");
  return formAction(request, chargesIntents, async (input, { values }) => {
    const charge = await waiveCharge({ actor: user, chargeId: input.chargeId, reason: input.reason });
    // `at` tells the page a new success apart from the last one
    return { ok: true as const, intent: input.intent, values, message: `Charge ${charge.id} waived.`, at: Date.now() };
  });
}

export default function AdminCharges({ loaderData, actionData }: Route.ComponentProps) {
  return <OfficeCharges charges={loaderData.charges} answer={actionData ?? null} />;
}
