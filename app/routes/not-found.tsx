import { data } from "react-router";
import { requireUser } from "~/.server/auth";
import type { Route } from "./+types/not-found";

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request);
  throw data(null, { status: 404 });
}

export default function NotFound() {
  return null;
}
