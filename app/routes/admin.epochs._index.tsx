import { Link } from "react-router";
import { z } from "zod";
import { NightLogImport, type NightLogAnswer } from "~/components/epochs/NightLogImport";
import { ErrorPage } from "~/components/ErrorPage";
import { formAction, intent } from "~/lib/actions.server";
import { requireEpochOffice } from "~/lib/auth/auth.server";
import { astrometryProgrammes, importNightLog } from "~/lib/epochs/epochs.server";
import { NIGHT_LOG_MAX_BYTES } from "~/lib/epochs/night-log-csv";
import { refusedCsvText } from "~/lib/proposals/target-csv";
import { Refusal, utf8Bytes } from "~/lib/forms";
import type { Route } from "./+types/admin.epochs._index";

export function meta() {
  return [{ title: "Epoch log · Office · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireEpochOffice(request);
  return { programmes: await astrometryProgrammes() };
}

const PASTE = "Paste the night log (a header row and one row per epoch).";

const nightLogIntents = z.discriminatedUnion("intent", [
  intent(
    "night-log",
    z.object({
      csv: z
        .string({ error: PASTE })
        .refine((csv) => csv.trim() !== "", { error: PASTE })
        .refine((csv) => utf8Bytes(csv) <= NIGHT_LOG_MAX_BYTES, { error: "The night log is larger than 2 MB; split it." }),
    }),
  ),
]);

export async function action({ request }: Route.ActionArgs) {
  const user = await requireEpochOffice(request);
  return formAction(request, nightLogIntents, async ({ intent, csv }): Promise<NightLogAnswer> => {
    const { report, saved } = await importNightLog({ user, csv });
    if (report.error) throw new Refusal(report.error, { field: "csv" });
    return { ok: true, intent, saved, report, remaining: refusedCsvText(report) };
  });
}

export default function OfficeEpochs({ loaderData }: Route.ComponentProps) {
  const { programmes } = loaderData;
  return (
    <div className="space-y-4">
      <p className="text-sm"><Link to="/admin">Office</Link> › Epoch log</p>
      <h1>Epoch log</h1>
      <p className="text-slate-700">Accepted astrometry programmes: record each executed or lost epoch on the programme's page, or many at once from the night log below.</p>
      <table className="table-base" aria-label="Astrometry programmes">
        <thead><tr><th>Programme</th><th>Title</th><th>Call</th><th>Targets</th><th>Executed</th><th>Lost</th><th>Still planned</th></tr></thead>
        <tbody>
          {programmes.map((p) => (
            <tr key={p.proposalId}>
              <td><Link to={`/admin/epochs/${p.proposalId}`}>{p.code}</Link></td>
              <td>{p.title}</td>
              <td>{p.semesterCode}</td>
              <td>{p.observations.map((o) => o.targetName).join(", ")}</td>
              <td className="tabular-nums">{p.executed}</td>
              <td className="tabular-nums">{p.lost}</td>
              <td className="tabular-nums">{p.remaining}</td>
            </tr>
          ))}
          {programmes.length === 0 ? <tr><td colSpan={7}>No accepted programme has an astrometric observation.</td></tr> : null}
        </tbody>
      </table>
      <NightLogImport />
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorPage error={error} />;
}
