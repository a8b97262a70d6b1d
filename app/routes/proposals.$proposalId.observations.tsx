import { useState } from "react";
import { Link } from "react-router";
import { z } from "zod";
import { LiveFeasibilitySummary } from "~/components/FeasibilityParts";
import { DeleteButton } from "~/components/proposals/DeleteButton";
import { ObservationForm } from "~/components/proposals/ObservationForm";
import { useWorkspace } from "~/components/workspace";
import { formAction, intent, orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import { idSchema } from "~/lib/forms";
import { createObservation, deleteObservation, listObservations, updateObservation } from "~/lib/proposals/observations.server";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { listTargets } from "~/lib/proposals/targets.server";
import { observationSchema } from "~/lib/schemas/proposals";
import type { Route } from "./+types/proposals.$proposalId.observations";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  const { observations, options } = await orNotFound(listObservations({ user, proposalId }));
  const targets = await orNotFound(listTargets({ user, proposalId }));
  return { observations, options, targets: targets.map((t) => ({ id: t.id, name: t.name, magnitude: t.magnitude, band: t.band })) };
}

const observationId = z.object({ observationId: idSchema("observation") });

const observationIntents = z.discriminatedUnion("intent", [
  intent("create", observationSchema),
  intent("update", observationId.and(observationSchema)),
  intent("delete", observationId),
]);

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await orNotFound(getProposalForUser({ proposalId, user })); // a stranger gets the 404 before any parsing
  return formAction(request, observationIntents, async (input) => {
    switch (input.intent) {
      case "create":
        await createObservation({ user, proposalId, input });
        return { ok: true as const, intent: input.intent, message: "Observation added." };
      case "update":
        await updateObservation({ user, proposalId, observationId: input.observationId, input });
        return { ok: true as const, intent: input.intent, message: "Observation saved." };
      case "delete":
        await deleteObservation({ user, proposalId, observationId: input.observationId });
        return { ok: true as const, intent: input.intent, message: "Observation deleted." };
    }
  });
}

type ObservationRow = Route.ComponentProps["loaderData"]["observations"][number];

export default function Observations({ loaderData }: Route.ComponentProps) {
  const workspace = useWorkspace();
  const [editing, setEditing] = useState<ObservationRow | null>(null);
  const { observations, targets, options } = loaderData;
  const without = targets.filter((t) => !observations.some((o) => o.targetId === t.id));
  return (
    <div className="space-y-5">
      {targets.length === 0 ? (
        <p className="card">Add targets first, on the <Link to="../targets" relative="path">Targets</Link> tab.</p>
      ) : null}
      {options.length === 0 ? <p role="alert" className="card text-red-800">This call offers no telescope with an instrument yet; ask the observatory office.</p> : null}
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="table-base">
          <thead>
            <tr>
              <th>Target</th><th>Instrument</th><th>Filter</th><th className="text-right">Per frame</th><th className="text-right">Frames</th><th className="text-right">Epochs / sem.</th>
              <th className="text-right">Baseline</th><th className="text-right">σμ goal</th><th>Moon</th><th className="text-right">Airmass ≤</th><th className="text-right">Seeing</th>
              {workspace.editable ? <th /> : null}
            </tr>
          </thead>
          <tbody>
            {observations.map((o) => (
              <tr key={o.id} className={editing?.id === o.id ? "bg-dusk-100/60" : "hover:bg-night-50"}>
                <td className="font-semibold">{o.targetName}</td>
                <td>{o.instrumentName}</td>
                <td>{o.band}</td>
                <td className="text-right tabular-nums whitespace-nowrap">{o.mode === "snr" ? `SNR ${o.snrGoal}` : `${o.exposureSeconds} s`}</td>
                <td className="text-right tabular-nums">{o.framesPerEpoch}</td>
                <td className="text-right tabular-nums">{o.epochsPerSemester}</td>
                <td className="text-right tabular-nums">{o.baselineYears !== null ? `${o.baselineYears} yr` : "—"}</td>
                <td className="text-right tabular-nums">{o.requiredPmPrecisionMasPerYr !== null ? `${o.requiredPmPrecisionMasPerYr} mas/yr` : "—"}</td>
                <td>{o.moonCategory}</td>
                <td className="text-right tabular-nums">{o.maxAirmass}</td>
                <td className="text-right tabular-nums">{o.seeingArcsec}″</td>
                {workspace.editable ? (
                  <td className="whitespace-nowrap">
                    <button type="button" className="btn-quiet mr-1" onClick={() => setEditing(o)}>Edit</button>
                    <DeleteButton idField="observationId" id={o.id} question={`Delete this observation of ${o.targetName}?`} />
                  </td>
                ) : null}
              </tr>
            ))}
            {observations.length === 0 ? <tr><td colSpan={12} className="py-6 text-center text-slate-500">No observations yet.</td></tr> : null}
          </tbody>
        </table>
      </div>
      {without.length && targets.length ? (
        <p className="text-sm text-amber-800">Without an observation yet: {without.map((t) => t.name).join(", ")}.</p>
      ) : null}
      {workspace.editable && targets.length && options.length ? (
        <ObservationForm key={editing?.id ?? "new"} data={loaderData} editing={editing} onDone={() => setEditing(null)} />
      ) : null}
      {/* Recomputed from the API after every save (the loader's data changes), without a page reload. */}
      {observations.length ? (
        <div className="card">
          <LiveFeasibilitySummary proposalId={workspace.id} revision={observations} />
        </div>
      ) : null}
    </div>
  );
}
