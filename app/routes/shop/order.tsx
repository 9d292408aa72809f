import { useEffect } from "react";
import { Link, useFetcher } from "react-router";
import { Logo } from "~/components/logo";
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireUser } from "~/.server/auth";
import { notFound } from "~/.server/http";
import { Assignment, Listing, Order } from "~/.server/models";
import { formatPrice } from "~/.server/services/shop";
import type { Route } from "./+types/order";

export const meta: Route.MetaFunction = () => [{ title: "Your order · Pacewright" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const buyer = await requireUser(request);
  const order = await Order.findOne({ where: { id: Number(params.orderId) || 0, buyerId: buyer.id } });
  if (!order) notFound("No such order.");
  const listing = await Listing.findByPk(order.listingId);
  const assignment = order.assignmentId ? await Assignment.findByPk(order.assignmentId) : null;
  return { order: { id: order.id, status: order.status, amount: formatPrice(order.amountCents, order.currency), title: listing?.title ?? "", slug: listing?.slug ?? "", start: assignment?.startDate ?? null, note: order.note } };
}

const MESSAGES: Record<string, string> = {
  pending: "Waiting for the payment provider to confirm the payment…",
  fulfilled: "Paid. The plan is on your calendar.",
  cancelled: "You cancelled at checkout. Nothing was charged and no sessions were added.",
  declined: "The payment was declined. Nothing was charged and no sessions were added.",
  refunded: "This order was refunded; its future sessions were removed.",
  flagged: "The payment did not match the order. We are checking it; no sessions were added yet.",
};

export default function OrderPage({ loaderData }: Route.ComponentProps) {
  // The status is followed through a fetcher until the webhook has settled the order.
  const fetcher = useFetcher<typeof loader>();
  const order = fetcher.data?.order ?? loaderData.order;
  useEffect(() => {
    if (order.status !== "pending") return;
    const t = setInterval(() => fetcher.load(`/shop/orders/${order.id}`), 1500);
    return () => clearInterval(t);
  }, [order.status, order.id]); // eslint-disable-line react-hooks/exhaustive-deps
  return (
    <div className="mx-auto max-w-xl px-4 py-10">
      <Link to="/shop" className="mb-6 flex items-center gap-2 text-xl font-semibold text-teal">
        <Logo /> Plan shop
      </Link>
      <Card>
        <h1 className="text-2xl font-semibold">Order #{order.id}</h1>
        <p className="num mt-1 text-ink-soft">
          {order.title} · {order.amount}
        </p>
        <div className="mt-4" data-testid="order-status" data-status={order.status}>
          <FormMessage tone={order.status === "fulfilled" ? "ok" : order.status === "pending" ? "ok" : "error"}>{MESSAGES[order.status] ?? order.status}</FormMessage>
        </div>
        {order.status === "fulfilled" && (
          <p className="mt-4 text-sm">
            Week 1 starts on Monday {order.start}.{" "}
            <Link to="/athlete/calendar" className={buttonClass("primary", "mt-3")}>
              Open my calendar
            </Link>
          </p>
        )}
        {(order.status === "cancelled" || order.status === "declined") && (
          <Link to={`/shop/${order.slug}`} className={buttonClass("secondary", "mt-4")}>
            Back to the plan
          </Link>
        )}
      </Card>
    </div>
  );
}
