import { Link, redirect } from "react-router";
import { z } from "zod";
import { Breadcrumbs } from "~/components/office/Breadcrumbs";
import { resultFor } from "~/components/office/fields";
import { TelescopeForm } from "~/components/office/TelescopeForm";
import { requireRole } from "~/lib/auth/auth.server";
import { createTelescope, listTelescopes } from "~/lib/office/office.server";
import { formAction, intent } from "~/lib/actions.server";
import { telescopeSchema } from "~/lib/schemas/office";
import { supportedTimeZones } from "~/lib/time-zones";
import type { Route } from "./+types/admin.telescopes._index";

export function meta() {
  return [{ title: "Telescopes · Observatory office · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  return { telescopes: await listTelescopes(), timeZones: supportedTimeZones() };
}

const telescopesIntents = z.discriminatedUnion("intent", [intent("create", telescopeSchema)]);

export async function action({ request }: Route.ActionArgs) {
  const actor = await requireRole(request, "admin");
  return formAction(request, telescopesIntents, async ({ intent: _, ...values }) => {
    const id = await createTelescope({ actor, values });
    return redirect(`/admin/telescopes/${id}?saved=created`);
  });
}

const deg = (v: number, pos: string, neg: string) => `${Math.abs(v).toFixed(4)}° ${v >= 0 ? pos : neg}`;

export default function Telescopes({ loaderData, actionData }: Route.ComponentProps) {
  const { telescopes, timeZones } = loaderData;
  return (
    <div className="space-y-6">
      <Breadcrumbs trail={[{ to: "/admin", label: "Observatory office" }, { label: "Telescopes" }]} />
      <div>
        <h1>Telescopes</h1>
        <p className="mt-1 text-sm text-slate-600">
          Sites, apertures and instruments the calculators use. Each change is written to the audit log.
        </p>
      </div>
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="table-base">
          <thead>
            <tr>
              <th>Telescope</th>
              <th>Site</th>
              <th>Latitude</th>
              <th>Longitude</th>
              <th className="text-right">Elevation (m)</th>
              <th>Time zone</th>
              <th className="text-right">Aperture (m)</th>
              <th className="text-right">Obstruction</th>
              <th>Instruments</th>
            </tr>
          </thead>
          <tbody>
            {telescopes.map((t) => (
              <tr key={t.id} className="hover:bg-night-50">
                <td className="font-semibold">
                  <Link to={`/admin/telescopes/${t.id}`}>{t.name}</Link>
                </td>
                <td>{t.siteName}</td>
                <td className="tabular-nums">{deg(t.latitudeDeg, "N", "S")}</td>
                <td className="tabular-nums">{deg(t.longitudeDeg, "E", "W")}</td>
                <td className="text-right tabular-nums">{t.elevationM}</td>
                <td>{t.timeZone}</td>
                <td className="text-right tabular-nums">{t.apertureM}</td>
                <td className="text-right tabular-nums">{t.centralObstruction}</td>
                <td>
                  {t.instruments.length
                    ? t.instruments.map((i, n) => (
                        <span key={i.id}>
                          {n > 0 ? ", " : null}
                          <Link to={`/admin/instruments/${i.id}`}>{i.name}</Link>
                        </span>
                      ))
                    : <span className="text-slate-500">none yet</span>}
                </td>
              </tr>
            ))}
            {telescopes.length === 0 ? (
              <tr>
                <td colSpan={9} className="py-6 text-center text-slate-500">No telescope is set up yet. Add the first one below.</td>
              </tr>
            ) : null}
          </tbody>
        </table>
      </div>
      <section className="card space-y-3" aria-labelledby="new-telescope">
        <h2 id="new-telescope">Add a telescope</h2>
        <TelescopeForm intent="create" result={resultFor(actionData, "create")} timeZones={timeZones} submitLabel="Add the telescope" />
      </section>
    </div>
  );
}
