import crypto from "node:crypto";
import http from "node:http";
import Stripe from "stripe";

/** Card numbers the local pay page knows: one always succeeds, one is always declined. */
export const TEST_CARDS = { success: "4242 4242 4242 4242", declined: "4000 0000 0000 0002" };

interface FakeSession {
  id: string;
  object: "checkout.session";
  amount_total: number;
  currency: string;
  metadata: Record<string, string>;
  client_reference_id: string | null;
  success_url: string;
  cancel_url: string;
  status: "open" | "complete" | "expired";
  payment_status: "unpaid" | "paid";
  payment_intent: string | null;
  url: string;
  mode: "payment";
  line_items: { name: string; amount: number }[];
}

/** Reads Stripe's form encoding (a[b][0][c]=v) into nested objects. */
function parseForm(body: string): any {
  const out: any = {};
  for (const [key, value] of new URLSearchParams(body)) {
    const path = key.replace(/\]/g, "").split("[");
    let node = out;
    path.forEach((p, i) => {
      if (i === path.length - 1) node[p] = value;
      else node = node[p] ??= /^\d+$/.test(path[i + 1]) ? [] : {};
    });
  }
  return out;
}

const escape = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

/**
 * A small stand-in for the payment provider on loopback: the SDK's checkout-session create / retrieve and refund
 * calls, a hosted pay page (pay with a test card, or cancel), and webhook events signed with the shared secret,
 * delivered to the app and retried on non-2xx answers. For local use and tests only.
 */
export async function startFakePayments(opts: { port: number; webhookUrl: string; webhookSecret: string }) {
  const sessions = new Map<string, FakeSession>();
  const signer = new Stripe("sk_test_signer", { telemetry: false });
  let base = "";
  const deliveries: Promise<void>[] = [];
  const refunded = new Map<string, { id: string; amount: number; status: string }[]>();
  const refundsByKey = new Map<string, unknown>();
  /** The charge behind a paid session, as charge.* events carry it. */
  const chargeOf = (s: FakeSession) => {
    const refunds = refunded.get(s.id) ?? [];
    const amountRefunded = refunds.reduce((sum, r) => sum + r.amount, 0);
    return {
      id: `ch_${s.id.slice(8)}`,
      object: "charge",
      amount: s.amount_total,
      currency: s.currency,
      payment_intent: s.payment_intent,
      amount_refunded: amountRefunded,
      refunded: amountRefunded >= s.amount_total,
      metadata: s.metadata,
      refunds: { object: "list", data: refunds },
    };
  };

  const deliver = (type: string, object: unknown) => {
    const event = {
      id: `evt_${crypto.randomBytes(12).toString("hex")}`,
      object: "event",
      type,
      created: Math.floor(Date.now() / 1000),
      data: { object },
      livemode: false,
      api_version: "2025-01-01",
    };
    const payload = JSON.stringify(event);
    const job = (async () => {
      for (let attempt = 0; attempt < 5; attempt++) {
        try {
          const header = signer.webhooks.generateTestHeaderString({ payload, secret: opts.webhookSecret });
          const res = await fetch(opts.webhookUrl, {
            method: "POST",
            body: payload,
            headers: { "Content-Type": "application/json", "Stripe-Signature": header },
          });
          if (res.ok) return;
        } catch {
          /* the app may be restarting; try again */
        }
        await new Promise((r) => setTimeout(r, 200 * 2 ** attempt));
      }
    })();
    deliveries.push(job);
    return { event, job };
  };

  const json = (res: http.ServerResponse, status: number, body: unknown) =>
    res.writeHead(status, { "Content-Type": "application/json" }).end(JSON.stringify(body));

  const server = http.createServer(async (req, res) => {
    const url = new URL(req.url ?? "/", base);
    let body = "";
    for await (const chunk of req) body += chunk;
    if (req.method === "POST" && url.pathname === "/v1/checkout/sessions") {
      const p = parseForm(body);
      const items = (p.line_items ?? []) as any[];
      const amount = items.reduce((s, i) => s + Number(i.price_data?.unit_amount ?? 0) * Number(i.quantity ?? 1), 0);
      const id = `cs_test_${crypto.randomBytes(12).toString("hex")}`;
      const session: FakeSession = {
        id,
        object: "checkout.session",
        amount_total: amount,
        currency: String(items[0]?.price_data?.currency ?? "eur"),
        metadata: p.metadata ?? {},
        client_reference_id: p.client_reference_id ?? null,
        success_url: String(p.success_url ?? ""),
        cancel_url: String(p.cancel_url ?? ""),
        status: "open",
        payment_status: "unpaid",
        payment_intent: null,
        url: `${base}/pay/${id}`,
        mode: "payment",
        line_items: items.map((i) => ({
          name: String(i.price_data?.product_data?.name ?? "Item"),
          amount: Number(i.price_data?.unit_amount ?? 0),
        })),
      };
      sessions.set(id, session);
      return json(res, 200, session);
    }
    const retrieve = url.pathname.match(/^\/v1\/checkout\/sessions\/([\w-]+)$/);
    if (req.method === "GET" && retrieve) {
      const s = sessions.get(retrieve[1]);
      return s
        ? json(res, 200, s)
        : json(res, 404, { error: { type: "invalid_request_error", message: "No such checkout session" } });
    }
    if (req.method === "POST" && url.pathname === "/v1/refunds") {
      // Like the real service: a repeated Idempotency-Key answers the first refund again, and a charge that is
      // already refunded in full cannot be refunded a second time.
      const key = String(req.headers["idempotency-key"] ?? "");
      if (key && refundsByKey.has(key)) return json(res, 200, refundsByKey.get(key));
      const p = parseForm(body);
      const session = [...sessions.values()].find((s) => s.payment_intent && s.payment_intent === p.payment_intent);
      if (!session) return json(res, 400, { error: { type: "invalid_request_error", message: "No such payment" } });
      const done = refunded.get(session.id) ?? [];
      if (done.reduce((s, r) => s + r.amount, 0) >= session.amount_total)
        return json(res, 400, {
          error: {
            type: "invalid_request_error",
            code: "charge_already_refunded",
            message: "This charge has already been refunded.",
          },
        });
      const refund = {
        id: `re_${crypto.randomBytes(10).toString("hex")}`,
        object: "refund",
        amount: session.amount_total,
        currency: session.currency,
        payment_intent: session.payment_intent,
        status: "succeeded",
        metadata: p.metadata ?? {},
      };
      done.push(refund);
      refunded.set(session.id, done);
      if (key) refundsByKey.set(key, refund);
      deliver("charge.refunded", chargeOf(session));
      return json(res, 200, refund);
    }
    const pay = url.pathname.match(/^\/pay\/([\w-]+)$/);
    if (pay) {
      const s = sessions.get(pay[1]);
      if (!s) return res.writeHead(404, { "Content-Type": "text/plain" }).end("No such checkout");
      if (req.method === "POST") {
        const form = new URLSearchParams(body);
        if (form.get("action") === "cancel") {
          s.status = "expired";
          await deliver("checkout.session.expired", s).job;
          return res.writeHead(303, { Location: s.cancel_url }).end();
        }
        const card = (form.get("card") ?? "").replace(/\s+/g, "");
        if (card === TEST_CARDS.success.replace(/\s+/g, "")) {
          s.status = "complete";
          s.payment_status = "paid";
          s.payment_intent = `pi_${crypto.randomBytes(12).toString("hex")}`;
          await deliver("checkout.session.completed", s).job;
          return res.writeHead(303, { Location: s.success_url.replace("{CHECKOUT_SESSION_ID}", s.id) }).end();
        }
        await deliver("checkout.session.async_payment_failed", s).job;
        return res
          .writeHead(200, { "Content-Type": "text/html; charset=utf-8" })
          .end(
            page(
              s,
              card === TEST_CARDS.declined.replace(/\s+/g, "")
                ? "The card was declined. Try another card."
                : "Use one of the test cards below.",
            ),
          );
      }
      return res.writeHead(200, { "Content-Type": "text/html; charset=utf-8" }).end(page(s));
    }
    json(res, 404, { error: { type: "invalid_request_error", message: `Unknown path ${url.pathname}` } });
  });

  function page(s: FakeSession, error?: string) {
    const amount = `${(s.amount_total / 100).toFixed(2)} ${s.currency.toUpperCase()}`;
    return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>Local test payment</title>
<style>body{font-family:system-ui,sans-serif;background:#eef0f3;color:#222;display:flex;justify-content:center;padding:40px 16px}main{background:#fff;border-radius:10px;padding:24px;max-width:420px;width:100%;box-shadow:0 2px 10px #0002}label{display:block;margin:16px 0 4px}input{width:100%;padding:10px;font-size:16px;box-sizing:border-box}button{margin-top:16px;padding:10px 16px;font-size:16px;width:100%}p.err{color:#a00}small{color:#666}</style></head>
<body><main><h1>Local test payment</h1><p>This page stands in for the payment provider on this machine. No money moves.</p>
<p><strong>${escape(s.line_items.map((i) => i.name).join(", "))}</strong><br>${escape(amount)}</p>${error ? `<p class="err" role="alert">${escape(error)}</p>` : ""}
<form method="post"><label for="card">Card number</label><input id="card" name="card" inputmode="numeric" autocomplete="off" placeholder="${TEST_CARDS.success}">
<small>Test cards: ${TEST_CARDS.success} pays; ${TEST_CARDS.declined} is declined.</small><button type="submit" name="action" value="pay">Pay ${escape(amount)}</button></form>
<form method="post"><button type="submit" name="action" value="cancel">Cancel and go back</button></form></main></body></html>`;
  }

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, "127.0.0.1", () => resolve());
  });
  const port = (server.address() as { port: number }).port;
  base = `http://127.0.0.1:${port}`;
  return {
    port,
    sessions,
    deliver,
    chargeOf,
    /** A refund made by the provider's own dashboard, not through the app. */
    refundAtProvider: (sessionId: string) => {
      const s = sessions.get(sessionId);
      if (!s?.payment_intent) throw new Error("no payment to refund");
      const refund = {
        id: `re_${crypto.randomBytes(10).toString("hex")}`,
        amount: s.amount_total,
        status: "succeeded",
      };
      refunded.set(s.id, [...(refunded.get(s.id) ?? []), refund]);
      return deliver("charge.refunded", chargeOf(s));
    },
    settle: () => Promise.all(deliveries),
    close: () => new Promise<void>((r) => server.close(() => r())),
  };
}
