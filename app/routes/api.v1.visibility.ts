import { methodNotAllowed, visibilityResponse } from "~/lib/http/science-api.server";
import type { Route } from "./+types/api.v1.visibility";

// Public: anonymous use is allowed, under the per-IP rate limit.
export function loader({ request }: Route.LoaderArgs) {
  return visibilityResponse(request);
}

export function action() {
  return methodNotAllowed("GET");
}
