import { Form, Link, useActionData, useNavigation } from "react-router";
import { z } from "zod";
import { formAction, intent } from "~/lib/actions.server";
import { requireRole } from "~/lib/auth/auth.server";
import { valueList } from "~/lib/forms";
import { scienceCategories } from "~/lib/proposals/vocabulary";
import { myCategories, saveMyCategories } from "~/lib/review/desk.server";
import { reviewerCategoriesSchema } from "~/lib/schemas/review";
import type { Route } from "./+types/review.settings";

export function meta() {
  return [{ title: "Categories you know · Review · Nightshare" }];
}

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireRole(request, "reviewer");
  return { categories: await myCategories({ user }) };
}

const settingsIntents = z.discriminatedUnion("intent", [intent("save", reviewerCategoriesSchema)]);

export async function action({ request }: Route.ActionArgs) {
  const user = await requireRole(request, "reviewer");
  return formAction(request, settingsIntents, async (input) => {
    await saveMyCategories({ user, categories: input.categories });
    return { ok: true as const, intent: input.intent };
  });
}

export default function ReviewSettings({ loaderData }: Route.ComponentProps) {
  const actionData = useActionData<typeof action>();
  const navigation = useNavigation();
  // a refused save keeps the boxes as they were ticked
  const ticked = actionData && !actionData.ok ? valueList(actionData.values, "categories") : loaderData.categories;
  return (
    <div className="mx-auto max-w-2xl card space-y-3">
      <p className="text-sm"><Link to="/review">Review desk</Link> › Categories</p>
      <h1>Science categories you know</h1>
      <p className="text-slate-700">The chair's suggestion prefers reviewers who know a proposal's category.</p>
      {actionData?.ok ? <p role="status" className="rounded-md border border-emerald-300 bg-emerald-50 px-3 py-2 text-emerald-900">Saved.</p> : null}
      <Form method="post" className="space-y-2">
        {scienceCategories.map((c) => (
          <label key={c.value} className="flex items-center gap-2 font-normal">
            <input type="checkbox" name="categories" value={c.value} defaultChecked={ticked.includes(c.value)} /> {c.label}
          </label>
        ))}
        {actionData && !actionData.ok ? <p className="field-error" role="alert">{actionData.errors.categories ?? Object.values(actionData.errors)[0]}</p> : null}
        <button className="btn" name="intent" value="save" disabled={navigation.state !== "idle"}>Save</button>
      </Form>
    </div>
  );
}
