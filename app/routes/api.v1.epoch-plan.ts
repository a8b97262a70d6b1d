import { epochPlanResponse, methodNotAllowed } from "~/lib/http/science-api.server";
import type { Route } from "./+types/api.v1.epoch-plan";

// Public: anonymous use is allowed, under the per-IP rate limit.
export function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  return epochPlanResponse(request);
}

export function loader() {
  return methodNotAllowed("POST");
}
