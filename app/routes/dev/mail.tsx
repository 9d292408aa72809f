import { env } from "~/.server/env";
import { notFound } from "~/.server/http";
import { mailbox } from "~/.server/fakes/mailbox";
import { Card, PageHeader } from "~/components/ui/card";
import { formatDateTime } from "~/lib/format";
import type { Route } from "./+types/mail";

export const meta: Route.MetaFunction = () => [{ title: "Outbox (dev) · Pacewright" }];

/**
 * The local mail catcher's inbox. It exists only while the fakes run; it is open without sign-in so a new user can
 * read their own invitation or reset link, and it answers 404 whenever real e-mail is configured.
 */
export async function loader({ request }: Route.LoaderArgs) {
  if (!env().fakes) notFound();
  const url = new URL(request.url);
  const to = url.searchParams.get("to")?.toLowerCase() ?? "";
  const messages = mailbox().messages.filter((m) => !to || m.to.some((a) => a.toLowerCase() === to));
  return { messages, to };
}

export default function DevMail({ loaderData }: Route.ComponentProps) {
  const { messages, to } = loaderData;
  return (
    <main className="mx-auto max-w-4xl p-6">
      <PageHeader
        title="Outbox (local mail catcher)"
        lead="Messages the app sent while running with local fakes. Nothing here left this machine."
      />
      <form className="mb-6 flex gap-2" method="get">
        <label className="sr-only" htmlFor="to">
          Filter by recipient
        </label>
        <input id="to" name="to" defaultValue={to} placeholder="recipient@example.com" className="flex-1 rounded-lg border border-line bg-white px-3 py-2" />
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
