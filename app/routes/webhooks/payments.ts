import { jsonFailure } from "~/.server/replies";
import { handlePaymentEvent } from "~/.server/services/shop";
import type { Route } from "./+types/payments";

// Called by the payment provider, not a browser: the signature over the raw body is the authentication.
export async function action({ request }: Route.ActionArgs) {
  if (request.method !== "POST") return new Response("Method not allowed", { status: 405 });
  const raw = await request.text();
  try {
    const { outcome } = await handlePaymentEvent(raw, request.headers.get("stripe-signature"));
    return Response.json({ received: true, outcome });
  } catch (err) {
    return jsonFailure(err);
  }
}
