import { requireRole } from "~/lib/auth.server";
import type { Route } from "./+types/committee._index";

export async function loader({ request }: Route.LoaderArgs) {
  await requireRole(request, "chair");
  return {};
}

export default function Committee() {
  return (
    <div className="space-y-3">
      <h1>Committee</h1>
      <p className="text-slate-700">
        Reviewer assignment, review progress and the ranking board open here once a call's deadline has passed and
        proposals are in review.
      </p>
    </div>
  );
}
