import { astrometryResponse, methodNotAllowed } from "~/lib/http/science-api.server";
import type { Route } from "./+types/api.v1.astrometry";

// Public: anonymous use is allowed, under the per-IP rate limit.
export function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return methodNotAllowed("POST");
  return astrometryResponse(request);
}

export function loader() {
  return methodNotAllowed("POST");
}
