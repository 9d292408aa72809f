import { requireRole } from "~/.server/auth";
import { env } from "~/.server/env";
import { notFound } from "~/.server/http";
import { mailbox } from "~/.server/fakes/mailbox";
import { Card, PageHeader } from "~/components/ui/card";
import { formatDateTime } from "~/lib/format";
import type { Route } from "./+types/mail";

export const meta: Route.MetaFunction = () => [{ title: "Outbox (dev) · Pacewright" }];

/**
 * The local mail catcher's inbox: it shows every reset and invitation link, so it is a demo door. It does not exist
 * (404) unless the fakes run; in development it is open so a new user can read their own links; on a production
 * build with the demo switch on only admins may read it.
 */
export async function loader({ request }: Route.LoaderArgs) {
  if (!env().fakes) notFound();
  const adminsOnly = env().demoInProduction;
  if (adminsOnly) await requireRole(request, "admin");
  const url = new URL(request.url);
  const to = url.searchParams.get("to")?.toLowerCase() ?? "";
  const messages = mailbox().messages.filter((m) => !to || m.to.some((a) => a.toLowerCase() === to));
  return { messages, to, adminsOnly };
}

export default function DevMail({ loaderData }: Route.ComponentProps) {
  const { messages, to, adminsOnly } = loaderData;
  return (
    <main className="mx-auto max-w-4xl p-6">
      <PageHeader
        title="Outbox (local mail catcher)"
        lead="Messages the app sent while running with local fakes. Nothing here left this machine."
      />
      <p className="mb-6 rounded-lg border border-line bg-white px-4 py-3 text-sm" data-testid="outbox-access">
        {adminsOnly
          ? "Admins only: this server runs a production build with the demo switch on (PACEWRIGHT_FAKES=on), and these messages hold sign-in links for every account."
          : "Development only: open to anyone who can reach this machine. It never exists on a production build unless the demo switch is on, and then only for admins."}
      </p>
      <form className="mb-6 flex gap-2" method="get">
        <label className="sr-only" htmlFor="to">
          Filter by recipient
        </label>
        <input
          id="to"
          name="to"
          defaultValue={to}
          placeholder="recipient@example.com"
          className="flex-1 rounded-lg border border-line bg-white px-3 py-2"
        />
        <button className="rounded-lg bg-teal px-4 py-2 text-paper">Filter</button>
      </form>
      {messages.length === 0 ? (
        <p className="text-ink-soft">No messages yet.</p>
      ) : (
        <ul className="flex flex-col gap-4">
          {messages.map((m) => (
            <li key={m.id}>
              <Card>
                <article data-testid="caught-mail">
                  <header className="flex flex-wrap justify-between gap-2 text-sm">
                    <h2 className="text-base font-semibold">{m.subject}</h2>
                    <span className="text-ink-soft">{formatDateTime(m.receivedAt)} UTC</span>
                  </header>
                  <p className="text-sm text-ink-soft">To: {m.to.join(", ")}</p>
                  <pre className="mt-3 font-sans text-sm leading-relaxed break-words whitespace-pre-wrap">
                    {linkify(m.text)}
                  </pre>
                </article>
              </Card>
            </li>
          ))}
        </ul>
      )}
    </main>
  );
}

function linkify(text: string) {
  return text.split(/(https?:\/\/\S+)/g).map((part, i) =>
    /^https?:\/\//.test(part) ? (
      <a key={i} href={part} className="text-teal underline">
        {part}
      </a>
    ) : (
      part
    ),
  );
}
