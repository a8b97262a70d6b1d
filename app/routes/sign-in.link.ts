import { verifySignInCode } from "~/lib/auth.server";
import type { Route } from "./+types/sign-in.link";

// The one-click link in the sign-in e-mail lands here.
export async function loader({ request }: Route.LoaderArgs) {
  return verifySignInCode(request);
}
