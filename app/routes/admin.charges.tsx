import { data } from "react-router";
import { OfficeCharges } from "~/components/payments/OfficeCharges";
import { requireRole } from "~/lib/auth/auth.server";
import { fieldErrors, readForm } from "~/lib/forms";
import { allCharges, waiveCharge } from "~/lib/payments/office.server";
import { formValues, refusalResponse } from "~/lib/proposals/routes.server";
import { adminChargesIntent } from "~/lib/schemas/charges";
import type { Route } from "./+types/admin.charges";

export function meta() {
  return [{ title: "Charges · Office · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  return { charges: await allCharges() };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireRole(request, "admin");
  const values = formValues(await readForm(request));
  const parsed = adminChargesIntent.safeParse(values);
  if (!parsed.success) {
    const errors = fieldErrors(parsed.error);
    return data({ ok: false as const, errors: errors.intent ? { form: errors.intent } : errors, values, message: "", at: 0 }, { status: 400 });
  }
  try {
    const charge = await waiveCharge({ actor: user, chargeId: parsed.data.chargeId, reason: parsed.data.reason });
    return { ok: true as const, errors: {} as Record<string, string>, values, message: `Charge ${charge.id} waived.`, at: Date.now() };
  } catch (error) {
    const refused = refusalResponse(error, values);
    return data({ ...refused.data, message: "", at: 0 }, { status: refused.init?.status ?? 400 });
  }
}

export default function AdminCharges({ loaderData, actionData }: Route.ComponentProps) {
  return <OfficeCharges charges={loaderData.charges} answer={actionData ?? null} />;
}
