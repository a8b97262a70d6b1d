import { csvResponse } from "~/lib/http/download.server";
import { requireRole } from "~/lib/auth/auth.server";
import { chargesCsv } from "~/lib/payments/office.server";
import type { Route } from "./+types/admin.charges[.csv]";

/** Every charge as CSV (the office). */
export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  const { filename, csv } = await chargesCsv();
  return csvResponse(filename, csv);
}
