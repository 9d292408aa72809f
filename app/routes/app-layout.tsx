import { isRouteErrorResponse, Link, Outlet, redirect, useRouteLoaderData } from "react-router";
import { AppShell } from "~/components/app-shell";
import { BandsProvider } from "~/components/bands-context";
import { homeFor, requireUser } from "~/.server/auth";
import { env } from "~/.server/env";
import { bandSetsFor } from "~/.server/services/bands";
import { mustEnrol } from "~/.server/services/two-step";
import type { Route } from "./+types/app-layout";

export async function loader({ request, url }: Route.LoaderArgs) {
  const user = await requireUser(request);
  // A studio that requires two-step sign-in keeps its coaches and admins on the set-up page until it is on.
  if (url.pathname !== "/account/security" && (await mustEnrol(user))) throw redirect("/account/security");
  return {
    user: { name: user.name, role: user.role, email: user.email },
    devMail: env().fakes && (!env().demoInProduction || user.role === "admin"),
    home: homeFor(user.role),
    bandSets: await bandSetsFor(user),
  };
}

export default function AppLayout({ loaderData }: Route.ComponentProps) {
  return (
    <AppShell user={loaderData.user} devMail={loaderData.devMail}>
      <BandsProvider value={loaderData.bandSets}>
        <Outlet />
      </BandsProvider>
    </AppShell>
  );
}

/** Our own words for each failure; the router's and the server's texts are for the log, not for the page. */
function explain(error: unknown): { status: number; title: string; detail: string } {
  const status = isRouteErrorResponse(error) ? error.status : 500;
  if (status === 404)
    return {
      status,
      title: "Nothing here",
      detail:
        "This page does not exist, or it belongs to someone else. Check the address, or start again from your own pages.",
    };
  if (status === 403)
    return {
      status,
      title: "Not for this account",
      detail: "You are signed in, but this page is for another kind of account (coach, athlete or admin).",
    };
  if (status === 429) return { status, title: "Too many tries", detail: "Wait a minute, then try again." };
  if (status >= 400 && status < 500)
    return {
      status,
      title: "That did not work",
      detail: "The request could not be handled as sent. Go back and try again.",
    };
  return {
    status,
    title: "Something broke on our side",
    detail: "Nothing you did caused this. Try again in a moment; if it keeps happening, tell us what you were doing.",
  };
}

/** Errors on signed-in pages stay inside the app's frame, with the navigation, so the way back is one click. */
export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  const layout = useRouteLoaderData<typeof loader>("routes/app-layout");
  const { status, title, detail } = explain(error);
  const body = (
    <section className="mx-auto max-w-xl py-10" aria-labelledby="error-heading" data-testid="app-error">
      <p className="num text-sm font-medium tracking-wide text-brick uppercase">Error {status}</p>
      <h1 id="error-heading" className="mt-2 text-3xl font-semibold">
        {title}
      </h1>
      <p className="mt-3 text-ink-soft">{detail}</p>
      {layout && (
        <Link to={layout.home} className="mt-6 inline-block text-teal underline">
          Back to your start page
        </Link>
      )}
    </section>
  );
  return layout ? (
    <AppShell user={layout.user} devMail={layout.devMail}>
      {body}
    </AppShell>
  ) : (
    <main className="px-4">{body}</main>
  );
}
