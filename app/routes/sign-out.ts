import { redirect } from "react-router";
import { signOut } from "~/lib/auth/auth.server";
import type { Route } from "./+types/sign-out";

export async function action({ request }: Route.ActionArgs) {
  return signOut(request);
}

// Signing out changes state, so it is a POST only.
export function loader() {
  return redirect("/");
}
