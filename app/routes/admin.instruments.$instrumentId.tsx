import { redirect, useSearchParams } from "react-router";
import { z } from "zod";
import { Breadcrumbs } from "~/components/office/Breadcrumbs";
import { DeleteButton } from "~/components/office/DeleteButton";
import { resultFor, Saved } from "~/components/office/fields";
import { filterColumns, FilterRow } from "~/components/office/FilterRows";
import { InstrumentForm } from "~/components/office/InstrumentForm";
import { requireRole } from "~/lib/auth/auth.server";
import { createFilter, deleteFilter, deleteInstrument, getInstrument, updateFilter, updateInstrument } from "~/lib/office/office.server";
import { idSchema } from "~/lib/forms";
import { formAction, idParam, intent, orNotFound } from "~/lib/actions.server";
import { filterSchema, instrumentSchema } from "~/lib/schemas/office";
import type { Route } from "./+types/admin.instruments.$instrumentId";

export function meta({ data }: Route.MetaArgs) {
  return [{ title: `${data?.instrument.name ?? "Instrument"} · Observatory office · Nightshare` }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireRole(request, "admin");
  const instrumentId = idParam(params.instrumentId, "instrument");
  return { instrument: await orNotFound(getInstrument({ instrumentId })) };
}

const filterRow = z.object({ filterId: idSchema("filter id") });

const instrumentIntents = z.discriminatedUnion("intent", [
  intent("update", instrumentSchema),
  intent("delete"),
  intent("createFilter", filterSchema),
  intent("updateFilter", filterRow.and(filterSchema)),
  intent("deleteFilter", filterRow),
]);

export async function action({ request, params }: Route.ActionArgs) {
  const actor = await requireRole(request, "admin");
  const instrumentId = idParam(params.instrumentId, "instrument");
  return formAction(
    request,
    instrumentIntents,
    async (input) => {
      switch (input.intent) {
        case "update": {
          const { intent: _, ...values } = input;
          const { changed } = await updateInstrument({ actor, instrumentId, values });
          return redirect(`/admin/instruments/${instrumentId}?saved=${changed ? "instrument" : "unchanged"}`);
        }
        case "delete": {
          const { telescopeId, name } = await deleteInstrument({ actor, instrumentId });
          return redirect(`/admin/telescopes/${telescopeId}?deleted=${encodeURIComponent(name)}`);
        }
        case "createFilter": {
          const { intent, ...values } = input;
          const id = await createFilter({ actor, instrumentId, values });
          return { ok: true as const, intent, rowId: id };
        }
        case "updateFilter": {
          const { intent, filterId, ...values } = input;
          const { changed } = await updateFilter({ actor, instrumentId, filterId, values });
          return { ok: true as const, intent, rowId: filterId, changed };
        }
        case "deleteFilter": {
          await deleteFilter({ actor, instrumentId, filterId: input.filterId });
          return { ok: true as const, intent: input.intent, rowId: input.filterId };
        }
      }
    },
    { rowId: "filterId" },
  );
}

const savedText: Record<string, string> = {
  created: "The instrument was added. Now add its filters below.",
  instrument: "Saved.",
  unchanged: "Nothing had changed.",
};

export default function InstrumentPage({ loaderData, actionData }: Route.ComponentProps) {
  const { instrument } = loaderData;
  const [params] = useSearchParams();
  const saved = params.get("saved");
  return (
    <div className="space-y-6">
      <Breadcrumbs
        trail={[
          { to: "/admin", label: "Observatory office" },
          { to: "/admin/telescopes", label: "Telescopes" },
          { to: `/admin/telescopes/${instrument.telescope.id}`, label: instrument.telescope.name },
          { label: instrument.name },
        ]}
      />
      <div>
        <h1>{instrument.name}</h1>
        <p className="mt-1 text-sm text-slate-600">
          On {instrument.telescope.name}.{" "}
          {instrument.observations
            ? `${instrument.observations} observation${instrument.observations === 1 ? "" : "s"} in proposals use this instrument; a change here changes their computed exposure times.`
            : "No observation uses it yet."}
        </p>
      </div>
      {saved && !actionData ? <Saved>{savedText[saved] ?? "Saved."}</Saved> : null}

      <section className="card space-y-3" aria-labelledby="detector">
        <h2 id="detector">Detector and overheads</h2>
        <InstrumentForm key={JSON.stringify(instrument)} intent="update" initial={instrument} result={resultFor(actionData, "update")} submitLabel="Save the instrument" />
      </section>

      <section className="space-y-3" aria-labelledby="filters">
        <div>
          <h2 id="filters">Filters</h2>
          <p className="mt-1 text-sm text-slate-600">
            Zero point: photons s⁻¹ cm⁻² over the band from a magnitude-0 star above the atmosphere. Sky brightness in
            mag/arcsec² at the zenith for dark, grey and bright time (a brighter sky is a smaller number).
          </p>
        </div>
        <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
          <table className="table-base">
            <thead>
              <tr>
                {filterColumns.map((c) => (
                  <th key={c.name}>
                    {c.label}
                    {c.unit ? <span className="block text-xs font-normal text-slate-500">{c.unit}</span> : null}
                  </th>
                ))}
                <th>
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {instrument.filters.map((f) => (
                <FilterRow key={f.id} filter={f} />
              ))}
              <FilterRow key={`new-${instrument.filters.length}-${instrument.filters.map((f) => f.id).join(",")}`} isNew />
            </tbody>
          </table>
        </div>
      </section>

      <section className="space-y-2" aria-labelledby="delete-instrument">
        <h2 id="delete-instrument" className="text-base">Delete this instrument</h2>
        <p className="text-sm text-slate-600">Refused while observations in proposals use it.</p>
        <DeleteButton
          intent="delete"
          label={`Delete ${instrument.name}`}
          question={`Delete ${instrument.name} and its filters?`}
          error={resultFor(actionData, "delete")?.errors?.form}
        />
      </section>
    </div>
  );
}
