import { Link, Outlet } from "react-router";
import { AppShell } from "~/components/app-shell";
import { Logo } from "~/components/logo";
import { buttonClass } from "~/components/ui/button";
import { getUser } from "~/.server/auth";
import { env } from "~/.server/env";
import type { Route } from "./+types/layout";

// Public: the shop window is open to anyone; signed-in people get their usual app shell around it.
export async function loader({ request }: Route.LoaderArgs) {
  const user = await getUser(request);
  return { user: user ? { name: user.name, role: user.role, email: user.email } : null, devMail: env().fakes };
}

export default function ShopLayout({ loaderData }: Route.ComponentProps) {
  const { user, devMail } = loaderData;
  if (user)
    return (
      <AppShell user={user} devMail={devMail}>
        <Outlet />
      </AppShell>
    );
  return (
    <div className="min-h-screen">
      <header className="border-b border-line bg-white/80">
        <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-4 px-4 py-3">
          <Link to="/" className="flex items-center gap-2 font-semibold text-teal">
            <Logo className="h-7 w-7" /> Pacewright
          </Link>
          <Link to="/shop" className="text-sm font-medium text-ink hover:text-teal">
            Plan shop
          </Link>
          <Link to="/login?redirectTo=%2Fshop" className={buttonClass("secondary", "ml-auto px-3 py-1.5")}>
            Sign in
          </Link>
        </div>
      </header>
      <main className="mx-auto max-w-7xl px-4 py-6 sm:py-8">
        <Outlet />
      </main>
    </div>
  );
}
