import Stripe from "stripe";
import { env } from "./env";

/** The fake provider's key: any sk_test_ key works against it; it never reaches the real service. */
export const FAKE_KEY = "sk_test_pacewright_local_fake";

declare global {
  var __pacewrightStripe: { key: string; client: Stripe } | undefined;
}

/**
 * The payment provider client. With STRIPE_SECRET_KEY it talks to the real service; otherwise to the local fake on
 * 127.0.0.1 (same SDK, same calls), which the fakes start.
 */
export function payments(): Stripe {
  const e = env();
  // Without a real key the fake is the only provider, and it exists only while the demo fakes run.
  if (!e.stripeSecretKey && !e.fakes) throw new PaymentsNotConfigured();
  const key = e.stripeSecretKey ?? FAKE_KEY;
  if (globalThis.__pacewrightStripe?.key === `${key}@${e.fakePaymentsPort}`)
    return globalThis.__pacewrightStripe.client;
  const client = e.stripeSecretKey
    ? new Stripe(key, { maxNetworkRetries: 2, telemetry: false })
    : new Stripe(key, {
        host: "127.0.0.1",
        port: e.fakePaymentsPort,
        protocol: "http",
        maxNetworkRetries: 0,
        telemetry: false,
      });
  globalThis.__pacewrightStripe = { key: `${key}@${e.fakePaymentsPort}`, client };
  return client;
}

export class PaymentsNotConfigured extends Error {
  name = "PaymentsNotConfigured";
  constructor() {
    super("Payments are not set up on this server (STRIPE_SECRET_KEY is missing).");
  }
}

export const paymentsConfigured = () => Boolean(env().stripeSecretKey) || env().fakes;

/** Verifies a webhook's signature on its raw body; throws when it does not match. */
export function verifyWebhook(rawBody: string, signature: string | null) {
  if (!signature) throw new Error("missing signature");
  return payments().webhooks.constructEvent(rawBody, signature, env().stripeWebhookSecret);
}
