import { Link } from "react-router";
import { requireRole } from "~/lib/auth/auth.server";
import { Call, Charge, Telescope, User } from "~/models/index.server";
import type { Route } from "./+types/admin._index";

export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  const [users, telescopes, calls, unpaidCharges] = await Promise.all([User.count(), Telescope.count(), Call.count(), Charge.count({ where: { state: ["raised", "awaiting_payment"] } })]);
  return { users, telescopes, calls, unpaidCharges };
}

export default function AdminHome({ loaderData }: Route.ComponentProps) {
  const sections = [
    { to: "/admin/users", title: "People and roles", text: `${loaderData.users} accounts. Grant and revoke reviewer, chair, admin and observer roles.` },
    { to: "/admin/telescopes", title: "Telescopes and instruments", text: `${loaderData.telescopes} telescopes. Sites, time zones, apertures, detectors and their filters.` },
    { to: "/admin/epochs", title: "Epoch log", text: "Executed and lost epochs of accepted astrometry programmes, one by one or from a night log." },
    { to: "/admin/calls", title: "Calls for proposals", text: `${loaderData.calls} calls. Dates and deadlines, page limits, hours offered and charge rates.` },
    { to: "/admin/charges", title: "Charges", text: `${loaderData.unpaidCharges} unpaid. Access fees and page charges, their payments and waivers; CSV export.` },
  ];
  return (
    <div className="space-y-4">
      <h1>Observatory office</h1>
      <p className="text-slate-600">
        {loaderData.telescopes} telescopes and {loaderData.calls} calls are set up.
      </p>
      <div className="grid gap-4 md:grid-cols-3">
        {sections.map((s) => (
          <Link key={s.to} to={s.to} className="card block no-underline hover:border-night-700 hover:no-underline">
            <h2 className="text-night-800">{s.title}</h2>
            <p className="mt-1 text-sm text-slate-600">{s.text}</p>
          </Link>
        ))}
      </div>
    </div>
  );
}
