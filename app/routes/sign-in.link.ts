import { verifySignInCode } from "~/lib/auth/sign-in.server";
import type { Route } from "./+types/sign-in.link";

// The one-click link in the sign-in e-mail lands here (in the browser that asked for the code).
export async function loader({ request }: Route.LoaderArgs) {
  return verifySignInCode(request);
}
