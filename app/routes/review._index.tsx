import { requireRole } from "~/lib/auth.server";
import type { Route } from "./+types/review._index";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireRole(request, "reviewer");
  return { name: user.name ?? user.email };
}

export default function Review({ loaderData }: Route.ComponentProps) {
  return (
    <div className="space-y-3">
      <h1>Review</h1>
      <p className="text-slate-700">
        {loaderData.name}, the proposals assigned to you will be listed here once the chair assigns reviewers for a call.
        No assignment is waiting for you yet.
      </p>
    </div>
  );
}
