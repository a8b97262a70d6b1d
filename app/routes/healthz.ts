import { data } from "react-router";
import { serviceHealth } from "~/lib/http/health.server";

// `ok`/`fail` per service, never the raw error text (that goes to the server log). Each status
// is at most a few seconds old and probed in the background, so this answers at once even while
// a service hangs.
export async function loader() {
  const health = await serviceHealth();
  return data(health, { status: health.database === "ok" ? 200 : 503, headers: { "Cache-Control": "no-store" } });
}
