import { Outlet, redirect } from "react-router";
import { AppShell } from "~/components/app-shell";
import { requireUser } from "~/.server/auth";
import { env } from "~/.server/env";
import { mustEnrol } from "~/.server/services/two-step";
import type { Route } from "./+types/app-layout";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  // A studio that requires two-step sign-in keeps its coaches and admins on the set-up page until it is on.
  if (new URL(request.url).pathname !== "/account/security" && (await mustEnrol(user))) throw redirect("/account/security");
  return { user: { name: user.name, role: user.role, email: user.email }, devMail: env().fakes && (!env().demoInProduction || user.role === "admin") };
}

export default function AppLayout({ loaderData }: Route.ComponentProps) {
  return (
    <AppShell user={loaderData.user} devMail={loaderData.devMail}>
      <Outlet />
    </AppShell>
  );
}
