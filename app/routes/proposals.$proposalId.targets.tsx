import { useState } from "react";
import { z } from "zod";
import { CsvImport } from "~/components/proposals/CsvImport";
import { DeleteButton } from "~/components/proposals/DeleteButton";
import { TargetForm } from "~/components/proposals/TargetForm";
import { useWorkspace } from "~/components/workspace";
import { fixed } from "~/lib/format";
import { BANDS } from "~/lib/astro/bands";
import { failure, formAction, intent, orNotFound } from "~/lib/actions.server";
import { formatDec, formatRa } from "~/lib/astro/coordinates";
import { requireUser } from "~/lib/auth/auth.server";
import { fieldErrors, idSchema } from "~/lib/forms";
import { getProposalForUser } from "~/lib/proposals/proposals.server";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { CSV_UPLOAD_MAX_BYTES, refusedCsvText } from "~/lib/proposals/target-csv";
import { createTarget, deleteTarget, importTargetsCsv, listTargets, updateTarget } from "~/lib/proposals/targets.server";
import { csvImportSchema, targetSchema } from "~/lib/schemas/proposals";
import type { Route } from "./+types/proposals.$proposalId.targets";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { targets: await orNotFound(listTargets({ user, proposalId: proposalIdParam(params) })) };
}

const targetId = z.object({ targetId: idSchema("target") });

const targetIntents = z.discriminatedUnion("intent", [
  intent("create", targetSchema),
  intent("update", targetId.and(targetSchema)),
  intent("delete", targetId),
  // the CSV comes as text or, when the box is empty, as a file (read in the action)
  intent("import", z.object({ csv: z.string().optional().default("") })),
]);

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await orNotFound(getProposalForUser({ proposalId, user })); // a stranger gets the 404 before any parsing
  return formAction(request, targetIntents, async (input, { form, values }) => {
    switch (input.intent) {
      case "create":
        await createTarget({ user, proposalId, input });
        return { ok: true as const, intent: input.intent, message: `${input.name} added.` };
      case "update":
        await updateTarget({ user, proposalId, targetId: input.targetId, input });
        return { ok: true as const, intent: input.intent, message: `${input.name} saved.` };
      case "delete": {
        const { name, observations } = await deleteTarget({ user, proposalId, targetId: input.targetId });
        return { ok: true as const, intent: input.intent, message: `${name} deleted${observations ? ` with its ${observations} observation${observations === 1 ? "" : "s"}` : ""}.` };
      }
      case "import": {
        const file = form.get("file");
        let csv = input.csv;
        if (csv.trim() === "" && file instanceof File && file.size > 0) {
          if (file.size > CSV_UPLOAD_MAX_BYTES) return failure(input.intent, { csv: "That file is larger than 2 MB; split it." }, values);
          csv = await file.text();
        }
        const parsed = csvImportSchema.safeParse({ csv });
        if (!parsed.success) return failure(input.intent, fieldErrors(parsed.error), values);
        const { report, saved } = await importTargetsCsv({ user, proposalId, csv: parsed.data.csv });
        if (report.error) return failure(input.intent, { csv: report.error }, { csv });
        return { ok: true as const, intent: input.intent, saved, report, remaining: refusedCsvText(report) };
      }
    }
  });
}

type Row = Route.ComponentProps["loaderData"]["targets"][number];

function magnitudesText(m: Record<string, number>) {
  const parts = BANDS.filter((b) => m[b] !== undefined).map((b) => `${b} ${m[b].toFixed(2)}`);
  return parts.length ? parts.join(" · ") : "—";
}

export default function Targets({ loaderData }: Route.ComponentProps) {
  const workspace = useWorkspace();
  const [editing, setEditing] = useState<Row | null>(null);
  const { targets } = loaderData;
  return (
    <div className="space-y-5">
      <div className="overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="table-base">
          <thead>
            <tr>
              <th>Name</th><th>RA</th><th>Dec</th><th className="text-right">μα* (mas/yr)</th><th className="text-right">μδ (mas/yr)</th><th>Magnitudes</th><th className="text-right">Obs.</th>
              {workspace.editable ? <th /> : null}
            </tr>
          </thead>
          <tbody>
            {targets.map((t) => (
              <tr key={t.id} className={editing?.id === t.id ? "bg-dusk-100/60" : "hover:bg-night-50"}>
                <td className="font-semibold">{t.name}</td>
                <td className="font-mono text-xs whitespace-nowrap">{formatRa(t.raDeg)}</td>
                <td className="font-mono text-xs whitespace-nowrap">{formatDec(t.decDeg)}</td>
                <td className="text-right tabular-nums">{fixed(t.pmRaMasPerYr, 2)}</td>
                <td className="text-right tabular-nums">{fixed(t.pmDecMasPerYr, 2)}</td>
                <td className="tabular-nums whitespace-nowrap">{magnitudesText(t.magnitudes)}</td>
                <td className={`text-right tabular-nums ${t.observations ? "" : "text-amber-700"}`} title={t.observations ? undefined : "No observation yet"}>{t.observations}</td>
                {workspace.editable ? (
                  <td className="whitespace-nowrap">
                    <button type="button" className="btn-quiet mr-1" onClick={() => setEditing(t)} aria-label={`Edit ${t.name}`}>Edit</button>
                    <DeleteButton idField="targetId" id={t.id} label={`Delete ${t.name}`} question={`Delete ${t.name}${t.observations ? ` and its ${t.observations} observation${t.observations === 1 ? "" : "s"}` : ""}?`} />
                  </td>
                ) : null}
              </tr>
            ))}
            {targets.length === 0 ? (
              <tr><td colSpan={8} className="py-6 text-center text-slate-500">No targets yet: add one below or import a CSV.</td></tr>
            ) : null}
          </tbody>
        </table>
      </div>
      <p className="text-sm text-slate-600">{targets.length} target{targets.length === 1 ? "" : "s"}. Positions ICRS, J2000; proper motions carry them to the date of observation.</p>
      {workspace.editable ? (
        <div className="grid gap-5 xl:grid-cols-2">
          <TargetForm key={editing?.id ?? "new"} editing={editing} onDone={() => setEditing(null)} />
          <CsvImport />
        </div>
      ) : null}
    </div>
  );
}
