import { Outlet } from "react-router";
import { AppShell } from "~/components/app-shell";
import { requireUser } from "~/.server/auth";
import { env } from "~/.server/env";
import type { Route } from "./+types/app-layout";

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  return { user: { name: user.name, role: user.role, email: user.email }, devMail: env().fakes && (!env().demoInProduction || user.role === "admin") };
}

export default function AppLayout({ loaderData }: Route.ComponentProps) {
  return (
    <AppShell user={loaderData.user} devMail={loaderData.devMail}>
      <Outlet />
    </AppShell>
  );
}
