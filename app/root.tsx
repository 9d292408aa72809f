import "@fontsource/lexend/400.css";
import "@fontsource/lexend/500.css";
import "@fontsource/lexend/600.css";
import { data, isRouteErrorResponse, Links, Meta, Outlet, Scripts, ScrollRestoration } from "react-router";
import { Toast } from "./components/ui/toast";
import { readToast } from "~/.server/flash";
import type { Route } from "./+types/root";
import appCss from "./app.css?url";
import { useNonce } from "./lib/nonce";

export const links: Route.LinksFunction = () => [
  { rel: "stylesheet", href: appCss },
  { rel: "icon", href: "/favicon.svg", type: "image/svg+xml" },
];

export const meta: Route.MetaFunction = () => [{ title: "Pacewright" }];

export function Layout({ children }: { children: React.ReactNode }) {
  const nonce = useNonce();
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <meta name="theme-color" content="#1F5F5B" />
        <Meta />
        <Links />
      </head>
      <body className="min-h-screen">
        {children}
        <ScrollRestoration nonce={nonce} />
        <Scripts nonce={nonce} />
      </body>
    </html>
  );
}

/** The one-time note a redirect left (see `.server/flash.ts`): read here so every page, signed in or not, shows it. */
export async function loader({ request }: Route.LoaderArgs) {
  const { toast, headers } = await readToast(request);
  return data({ toast }, { headers });
}

export default function App({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <Toast toast={loaderData.toast} />
      <Outlet />
    </>
  );
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  let title = "Something went wrong";
  let detail = "The page could not be shown. Try again in a moment.";
  let stack: string | undefined;
  if (isRouteErrorResponse(error)) {
    title =
      error.status === 404
        ? "Not found"
        : error.status === 403
          ? "Not allowed"
          : error.status === 429
            ? "Slow down"
            : `Error ${error.status}`;
    detail =
      typeof error.data === "string" && error.data
        ? error.data
        : error.status === 404
          ? "There is nothing at this address, or it is not yours to see."
          : error.statusText || detail;
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message;
    stack = error.stack;
  }
  return (
    <main className="mx-auto max-w-xl p-8">
      <p className="text-sm font-medium tracking-wide text-brick uppercase">Pacewright</p>
      <h1 className="mt-2 text-3xl font-semibold">{title}</h1>
      <p className="mt-3 text-ink-soft">{detail}</p>
      <a href="/" className="mt-6 inline-block text-teal underline">
        Back to the start page
      </a>
      {stack && <pre className="mt-6 overflow-x-auto rounded bg-paper-deep p-4 text-xs">{stack}</pre>}
    </main>
  );
}
