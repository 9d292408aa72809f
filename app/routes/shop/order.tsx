import { useEffect } from "react";
import { Link, useRevalidator } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireUser } from "~/.server/auth";
import { requireOrder } from "~/.server/access";
import { notFound } from "~/.server/http";
import { Assignment } from "~/.server/models";
import { formatPrice } from "~/.server/services/shop";
import type { Route } from "./+types/order";

export const meta: Route.MetaFunction = () => [{ title: "Your order · Pacewright" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const buyer = await requireUser(request);
  const { order, listing, as } = await requireOrder(buyer, params.orderId);
  // This is the buyer's page; the seller follows the order in the shop's sales list.
  if (as !== "buyer") notFound("No such order.");
  const assignment = order.assignmentId ? await Assignment.findByPk(order.assignmentId) : null;
  return {
    order: {
      id: order.id,
      status: order.status,
      amount: formatPrice(order.paidCents ?? order.amountCents, order.paidCurrency ?? order.currency),
      refunded: order.refundedCents ? formatPrice(order.refundedCents, order.paidCurrency ?? order.currency) : null,
      title: listing?.title ?? "",
      slug: listing?.slug ?? "",
      start: assignment?.startDate ?? null,
      reason: order.status === "needs_review" ? order.reviewReason : null,
    },
  };
}

const MESSAGES: Record<string, string> = {
  created: "Waiting for the payment provider to confirm the payment…",
  fulfilled: "Paid. The plan is on your calendar.",
  expired: "The checkout was cancelled or ran out of time. Nothing was charged and no sessions were added.",
  declined: "The card was declined. Nothing was charged and no sessions were added; you can try another card.",
  refunded: "This order was refunded; its upcoming sessions were taken off your calendar.",
  needs_review:
    "Something about this payment needs a person to check it. Your coach has been told and will either deliver the plan or refund you; nothing is lost.",
};

export default function OrderPage({ loaderData }: Route.ComponentProps) {
  const { order } = loaderData;
  // Paid, but the plan is placed just after the payment (a background job): until then it is not on the calendar.
  const placing = order.status === "fulfilled" && !order.start;
  // The page asks its loader again until the provider has settled the order and the plan is placed.
  const { revalidate } = useRevalidator();
  const waiting = order.status === "created" || placing;
  useEffect(() => {
    if (!waiting) return;
    const t = setInterval(revalidate, 1500);
    return () => clearInterval(t);
  }, [waiting, revalidate]);
  return (
    <div className="mx-auto max-w-xl">
      <p className="mb-2 text-sm">
        <Link to="/shop" className="text-teal underline">
          Plan shop
        </Link>{" "}
        / Order
      </p>
      <Card>
        <h1 className="text-2xl font-semibold">Order #{order.id}</h1>
        <p className="num mt-1 text-ink-soft">
          {order.title} · {order.amount}
        </p>
        <div
          className="mt-4"
          data-testid="order-status"
          data-status={order.status}
          data-placed={order.start ? "yes" : "no"}
        >
          <FormMessage tone={order.status === "fulfilled" || order.status === "created" ? "ok" : "error"}>
            {placing ? "Paid. Putting the plan on your calendar…" : (MESSAGES[order.status] ?? order.status)}
          </FormMessage>
          {order.reason && <p className="mt-2 text-sm text-ink-soft">What we saw: {order.reason}</p>}
          {order.refunded && <p className="num mt-2 text-sm text-ink-soft">Refunded: {order.refunded}</p>}
        </div>
        {order.status === "fulfilled" && order.start && (
          <p className="mt-4 text-sm">
            Week 1 starts on Monday {order.start}.{" "}
            <Link to="/athlete/calendar" className={buttonClass("primary", "mt-3")}>
              Open my calendar
            </Link>
          </p>
        )}
        {(order.status === "expired" || order.status === "declined") && (
          <Link to={`/shop/${order.slug}`} className={buttonClass("secondary", "mt-4")}>
            Back to the plan
          </Link>
        )}
      </Card>
    </div>
  );
}
