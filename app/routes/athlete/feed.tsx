import { FeedSettings } from "~/components/feed-settings";
import { PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { feedPageAction, feedPageData } from "./feed.server";
import type { Route } from "./+types/feed";

export const meta: Route.MetaFunction = () => [{ title: "Calendar feed · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireRole(request, ["athlete", "coach"]);
  return feedPageData(user);
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireRole(request, ["athlete", "coach"]);
  return feedPageAction(user, await request.formData());
}

export default function FeedPage({ loaderData }: Route.ComponentProps) {
  return (
    <>
      <PageHeader title="Calendar feed" lead="Your plan in the calendar you already use." />
      <FeedSettings data={loaderData} />
    </>
  );
}
