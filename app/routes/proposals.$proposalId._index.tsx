import { useState } from "react";
import { data, useActionData, useRevalidator, useSubmit } from "react-router";
import { z } from "zod";
import { ConflictPanel, OverviewForm, toFormData, type OverviewAnswer } from "~/components/proposals/Overview";
import { formAction, intent, orNotFound } from "~/lib/actions.server";
import { requireUser } from "~/lib/auth/auth.server";
import type { FormValues } from "~/lib/forms";
import { proposalIdParam } from "~/lib/proposals/routes.server";
import { upcomingSemesters } from "~/lib/semesters";
import { getProposalForUser, overviewValues, updateOverview, type OverviewResult } from "~/lib/proposals/proposals.server";
import { overviewSchema } from "~/lib/schemas/proposals";
import type { Route } from "./+types/proposals.$proposalId._index";

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const { proposal, call, editable } = await orNotFound(getProposalForUser({ proposalId: proposalIdParam(params), user }));
  return { values: overviewValues(proposal), version: proposal.version, semesters: upcomingSemesters(call.semesterCode), callSemester: call.semesterCode, editable };
}

const overviewIntents = z.discriminatedUnion("intent", [intent("save", overviewSchema)]);

/** Someone saved meanwhile: nothing is stored, and the page shows both versions (409). */
function conflictAnswer(values: FormValues, conflict: Extract<OverviewResult, { ok: false }>["conflict"]): OverviewAnswer {
  return { ok: false, intent: "save", errors: {}, values, conflict };
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const proposalId = proposalIdParam(params);
  await orNotFound(getProposalForUser({ proposalId, user })); // a stranger gets the 404 before any parsing
  return formAction(request, overviewIntents, async ({ intent: _intent, ...input }, { values }) => {
    const result = await updateOverview({ user, proposalId, ...input });
    if (!result.ok) return data(conflictAnswer(values, result.conflict), { status: 409 });
    return { ok: true as const, intent: "save" as const, version: result.version, savedAt: new Date().toISOString() };
  });
}

export default function Overview({ loaderData }: Route.ComponentProps) {
  const actionData = useActionData<OverviewAnswer>();
  const submit = useSubmit();
  const revalidator = useRevalidator();
  // The conflict stays on screen until the user chooses; the form below keeps their version meanwhile.
  const [dismissed, setDismissed] = useState<string | null>(null);
  const raw = actionData && !actionData.ok ? (actionData.conflict ?? null) : null;
  const conflict = raw && dismissed !== `${raw.savedVersion}@${raw.savedAt}` ? raw : null;
  return (
    <div className="space-y-4">
      <ConflictPanel
        conflict={conflict}
        onKeepMine={() => conflict && submit(toFormData(conflict.mine, conflict.savedVersion), { method: "post" })}
        onTakeSaved={() => {
          if (conflict) setDismissed(`${conflict.savedVersion}@${conflict.savedAt}`);
          revalidator.revalidate();
        }}
      />
      <OverviewForm key={`${loaderData.version}-${conflict ? "conflict" : "ok"}`} {...loaderData} mine={conflict?.mine ?? null} />
    </div>
  );
}

