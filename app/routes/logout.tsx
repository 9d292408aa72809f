import { redirect } from "react-router";
import { endSignIn } from "~/.server/auth";
import type { Route } from "./+types/logout";

export async function action({ request }: Route.ActionArgs) {
  const cookie = await endSignIn(request);
  return redirect("/login", { headers: { "Set-Cookie": cookie } });
}

// Signing out changes state, so it only happens by POST; a visit here just goes home.
export async function loader() {
  return redirect("/");
}
