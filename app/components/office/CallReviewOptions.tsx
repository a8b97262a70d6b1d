// The call form's review options: who reviews (the panel, or the submitters themselves) and the
// rules of a distributed review. One fieldset, registered through <OfficeFields> like the rest.
import { useState } from "react";
import { DEFAULT_REVIEWS_PER_SUBMITTER, reviewModeLabels, reviewModes, unreviewedPolicies, unreviewedPolicyLabels } from "~/lib/review/vocabulary";
import type { ReviewOptionValues } from "~/lib/schemas/office";
import { fieldId, Message, NumberField, useField } from "./fields";

export function CallReviewOptions({ prefix, initial, typed, errors }: { prefix: string; initial: ReviewOptionValues; typed?: Record<string, unknown>; errors: Record<string, string | undefined> }) {
  const [mode, setMode] = useState<string>(String(typed?.reviewMode ?? initial.reviewMode));
  const modeField = useField("reviewMode", (e) => setMode(e.target.value));
  const competitors = useField("separateCompetitors");
  const policy = useField("unreviewedPolicy");
  const checked = typed ? typed.separateCompetitors === "on" || typed.separateCompetitors === true : initial.separateCompetitors;
  const id = (name: string) => fieldId(prefix, name);
  return (
    <fieldset className="card space-y-4" data-testid="call-review-options">
      <legend className="px-1 text-lg font-semibold text-night-900">Review</legend>
      <div>
        <label htmlFor={id("reviewMode")}>Who reviews</label>
        <select id={id("reviewMode")} {...modeField} className="input max-w-md" defaultValue={String(typed?.reviewMode ?? initial.reviewMode)}>
          {reviewModes.map((m) => (
            <option key={m} value={m}>{reviewModeLabels[m]}</option>
          ))}
        </select>
        <Message id={id("reviewMode")} error={errors.reviewMode} hint="With the submitters, each team names one reviewer (the PI or a Co-I) before it submits." />
      </div>
      <div className={mode === "distributed" ? "grid gap-4 md:grid-cols-3" : "hidden"}>
        <NumberField
          prefix={prefix}
          name="reviewsPerSubmitter"
          label="Reviews per team"
          unit="proposals"
          defaultValue={(typed?.reviewsPerSubmitter as string | undefined) ?? initial.reviewsPerSubmitter ?? DEFAULT_REVIEWS_PER_SUBMITTER}
          error={errors.reviewsPerSubmitter}
          hint="Proposals of this call each team's reviewer grades"
        />
        <div>
          <label htmlFor={id("unreviewedPolicy")}>A team that does not deliver by the review deadline</label>
          <select id={id("unreviewedPolicy")} {...policy} className="input" defaultValue={String(typed?.unreviewedPolicy ?? initial.unreviewedPolicy)}>
            {unreviewedPolicies.map((p) => (
              <option key={p} value={p}>{unreviewedPolicyLabels[p]}</option>
            ))}
          </select>
          <Message id={id("unreviewedPolicy")} error={errors.unreviewedPolicy} />
        </div>
        <div className="flex items-start gap-2 pt-6">
          <input id={id("separateCompetitors")} type="checkbox" {...competitors} defaultChecked={checked} className="mt-1" />
          <label htmlFor={id("separateCompetitors")} className="font-normal">
            Keep competitors apart: no team reviews a proposal asking for the same telescope and moon category as its own
          </label>
          <Message id={id("separateCompetitors")} error={errors.separateCompetitors} />
        </div>
      </div>
    </fieldset>
  );
}
