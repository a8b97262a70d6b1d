import { Link, redirect, useSearchParams } from "react-router";
import { z } from "zod";
import { Breadcrumbs } from "~/components/office/Breadcrumbs";
import { DeleteButton } from "~/components/office/DeleteButton";
import { resultFor, Saved } from "~/components/office/fields";
import { ClearFractionsForm } from "~/components/office/ClearFractionsForm";
import { InstrumentForm } from "~/components/office/InstrumentForm";
import { TelescopeForm } from "~/components/office/TelescopeForm";
import { requireRole } from "~/lib/auth/auth.server";
import { createInstrument, deleteTelescope, getTelescope, updateTelescope } from "~/lib/office/office.server";
import { formAction, idParam, intent, orNotFound } from "~/lib/actions.server";
import { clearFractionsOf, saveClearFractions } from "~/lib/office/clear-fractions.server";
import { clearFractionsSchema, instrumentSchema, telescopeSchema } from "~/lib/schemas/office";
import { supportedTimeZones } from "~/lib/time-zones";
import type { Route } from "./+types/admin.telescopes.$telescopeId";

export function meta({ data }: Route.MetaArgs) {
  return [{ title: `${data?.telescope.name ?? "Telescope"} · Observatory office · Nightshare` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  const telescopeId = idParam(params.telescopeId, "telescope");
  const [telescope, clearFractions] = await Promise.all([orNotFound(getTelescope({ telescopeId })), clearFractionsOf({ telescopeId })]);
  return { telescope, clearFractions, timeZones: supportedTimeZones() };
}

const telescopeIntents = z.discriminatedUnion("intent", [
  intent("update", telescopeSchema),
  intent("clearFractions", clearFractionsSchema),
  intent("createInstrument", instrumentSchema),
  intent("delete"),
]);

export async function action({ request, params }: Route.ActionArgs) {
  const actor = await requireRole(request, "admin");
  const telescopeId = idParam(params.telescopeId, "telescope");
  return formAction(request, telescopeIntents, async (input) => {
    switch (input.intent) {
      case "update": {
        const { intent: _, ...values } = input;
        const { changed } = await updateTelescope({ actor, telescopeId, values });
        return redirect(`/admin/telescopes/${telescopeId}?saved=${changed ? "telescope" : "unchanged"}`);
      }
      case "clearFractions": {
        const { intent: _, ...values } = input;
        const { changed } = await saveClearFractions({ actor, telescopeId, values });
        return redirect(`/admin/telescopes/${telescopeId}?saved=${changed ? "clear" : "unchanged"}#clear-nights`);
      }
      case "createInstrument": {
        const { intent: _, ...values } = input;
        const id = await createInstrument({ actor, telescopeId, values });
        return redirect(`/admin/instruments/${id}?saved=created`);
      }
      case "delete": {
        const { name } = await deleteTelescope({ actor, telescopeId });
        return redirect(`/admin/telescopes?deleted=${encodeURIComponent(name)}`);
      }
    }
  });
}

const savedText: Record<string, string> = {
  created: "The telescope was added. Now add its instruments.",
  telescope: "Saved.",
  unchanged: "Nothing had changed.",
  clear: "The expected clear nights were saved; the ranking board's RA pressure and the semester check use them.",
};

export default function TelescopePage({ loaderData, actionData }: Route.ComponentProps) {
  const { telescope, clearFractions, timeZones } = loaderData;
  const [params] = useSearchParams();
  const saved = params.get("saved");
  const deleted = params.get("deleted");
  return (
    <div className="space-y-6">
      <Breadcrumbs trail={[{ to: "/admin", label: "Observatory office" }, { to: "/admin/telescopes", label: "Telescopes" }, { label: telescope.name }]} />
      <h1>{telescope.name}</h1>
      {saved && !actionData ? <Saved>{savedText[saved] ?? "Saved."}</Saved> : null}
      {deleted && !actionData ? <Saved>The instrument {deleted} was deleted.</Saved> : null}

      <section className="card space-y-3" aria-labelledby="site">
        <h2 id="site">Site and optics</h2>
        <TelescopeForm
          key={telescope.updatedAt}
          intent="update"
          initial={telescope}
          result={resultFor(actionData, "update")}
          timeZones={timeZones}
          submitLabel="Save the telescope"
        />
      </section>

      <section className="card space-y-3" aria-labelledby="clear-nights">
        <h2 id="clear-nights">Expected clear nights per month</h2>
        <p className="text-sm text-slate-700">
          The percentage of nights expected to be clear enough to observe, from the site's own weather records. The ranking board multiplies the dark hours by it (RA pressure), and the semester check draws each night clear or lost with it. Leave a month empty when it is not known: it then counts as 100 % and the board says it is not set.
        </p>
        <ClearFractionsForm key={clearFractions.map((m) => m.clearFraction).join()} months={clearFractions} result={resultFor(actionData, "clearFractions")} />
      </section>

      <section className="space-y-3" aria-labelledby="instruments">
        <h2 id="instruments">Instruments</h2>
        <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
          <table className="table-base">
            <thead>
              <tr>
                <th>Instrument</th>
                <th className="text-right">Pixel scale (″/px)</th>
                <th className="text-right">Read noise (e⁻)</th>
                <th className="text-right">Gain (e⁻/ADU)</th>
                <th className="text-right">Full well (e⁻)</th>
                <th className="text-right">Throughput</th>
                <th className="text-right">Floor (mas)</th>
                <th>Filters</th>
              </tr>
            </thead>
            <tbody>
              {telescope.instruments.map((i) => (
                <tr key={i.id} className="hover:bg-night-50">
                  <td className="font-semibold">
                    <Link to={`/admin/instruments/${i.id}`}>{i.name}</Link>
                  </td>
                  <td className="text-right tabular-nums">{i.pixelScaleArcsec}</td>
                  <td className="text-right tabular-nums">{i.readNoiseE}</td>
                  <td className="text-right tabular-nums">{i.gainEPerAdu}</td>
                  <td className="text-right tabular-nums">{i.fullWellE.toLocaleString("en-GB")}</td>
                  <td className="text-right tabular-nums">{i.throughput}</td>
                  <td className="text-right tabular-nums">{i.astrometricFloorMas}</td>
                  <td>{i.bands.length ? i.bands.join(" ") : <span className="text-amber-700">no filters yet</span>}</td>
                </tr>
              ))}
              {telescope.instruments.length === 0 ? (
                <tr>
                  <td colSpan={8} className="py-6 text-center text-slate-500">No instrument yet. Proposals cannot use this telescope until it has one with filters.</td>
                </tr>
              ) : null}
            </tbody>
          </table>
        </div>
      </section>

      <section className="card space-y-3" aria-labelledby="new-instrument">
        <h2 id="new-instrument">Add an instrument</h2>
        <InstrumentForm intent="createInstrument" result={resultFor(actionData, "createInstrument")} submitLabel="Add the instrument" />
      </section>

      <section className="space-y-2" aria-labelledby="delete-telescope">
        <h2 id="delete-telescope" className="text-base">Delete this telescope</h2>
        <p className="text-sm text-slate-600">Only a telescope no call offers hours on, and whose instruments no observation uses, can be deleted.</p>
        <DeleteButton
          intent="delete"
          label={`Delete ${telescope.name}`}
          question={`Delete ${telescope.name} with its instruments and filters?`}
          error={resultFor(actionData, "delete")?.errors?.form}
        />
      </section>
    </div>
  );
}
