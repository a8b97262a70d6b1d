import { data, Link, useActionData } from "react-router";
import { z } from "zod";
import { EpochViews, PrecisionSummary } from "~/components/epochs/EpochProgressView";
import { RecordEpochForm, type RecordEpochAnswer } from "~/components/epochs/RecordEpochForm";
import { ErrorPage } from "~/components/ErrorPage";
import { formAction, idParam, intent, orNotFound } from "~/lib/actions.server";
import { requireEpochOffice } from "~/lib/auth/auth.server";
import { astrometryProgrammes, epochProgress, recordEpoch, telescopeChoices } from "~/lib/epochs/epochs.server";
import { epochFormSchema } from "~/lib/epochs/schema";
import { NO_PROPOSAL } from "~/lib/proposals/proposals.server";
import type { Route } from "./+types/admin.epochs.$proposalId";

export function meta() {
  return [{ title: "Epoch log · Office · Nightshare" }];
}

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireEpochOffice(request);
  const proposalId = idParam(params.proposalId, "proposal");
  const programme = (await astrometryProgrammes()).find((p) => p.proposalId === proposalId);
  if (!programme) throw data({ message: NO_PROPOSAL }, { status: 404 });
  const [progress, telescopes] = await orNotFound(Promise.all([epochProgress({ proposalId, withReplan: false }), telescopeChoices()]));
  return { programme, progress, telescopes };
}

const epochIntents = z.discriminatedUnion("intent", [intent("record", epochFormSchema)]);

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireEpochOffice(request);
  const proposalId = idParam(params.proposalId, "proposal");
  return formAction(request, epochIntents, async ({ intent, ...input }): Promise<RecordEpochAnswer> => {
    const row = await recordEpoch({ user, proposalId, input, source: "form" });
    return { ok: true, intent, message: row.lostCause ? `Lost epoch recorded (${row.lostCause}).` : `Epoch recorded: ${row.precisionMas?.toFixed(2)} mas (${row.precisionSource}).` };
  });
}

export default function OfficeEpochLog({ loaderData }: Route.ComponentProps) {
  const { programme, progress, telescopes } = loaderData;
  const answer = useActionData<typeof action>();
  const telescopeName = (id: number) => telescopes.find((t) => t.id === id)?.name ?? `telescope ${id}`;
  return (
    <div className="space-y-4">
      <p className="text-sm"><Link to="/admin/epochs">Epoch log</Link> › {programme.code}</p>
      <h1>{programme.code} · {programme.title}</h1>
      {/* a new answer starts the form again: empty after a success, with what was typed after a refusal */}
      <RecordEpochForm key={answer ? JSON.stringify(answer) : "fresh"} progress={progress} telescopes={telescopes} answer={answer} />
      {progress.observations.map((o) => (
        <section key={o.observationId} className="space-y-3">
          <h2>{o.targetName}</h2>
          <PrecisionSummary o={o} />
          <EpochViews progress={progress} o={o} telescopeName={telescopeName} />
        </section>
      ))}
    </div>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  return <ErrorPage error={error} />;
}
