import { env } from "../env";
import { startMailCatcher } from "./mail-catcher";
import { startFakePayments } from "./payments";

export interface RunningFakes {
  smtpPort: number | null;
  paymentsPort: number | null;
  close(): Promise<void>;
}

/** Starts the local stand-ins for outside services, unless real ones are configured. */
export async function startFakes(): Promise<RunningFakes> {
  const e = env();
  const closers: (() => Promise<void>)[] = [];
  let smtpPort: number | null = null;
  let paymentsPort: number | null = null;
  if (e.fakes && !e.smtpUrl) {
    const catcher = await startMailCatcher(e.smtpCatcherPort);
    smtpPort = catcher.port;
    closers.push(catcher.close);
  }
  if (e.fakes && !e.stripeSecretKey) {
    const pay = await startFakePayments({
      port: e.fakePaymentsPort,
      webhookUrl: `http://127.0.0.1:${e.port}/webhooks/payments`,
      webhookSecret: e.stripeWebhookSecret,
    });
    paymentsPort = pay.port;
    closers.push(pay.close);
  }
  return {
    smtpPort,
    paymentsPort,
    close: async () => {
      for (const close of closers.reverse()) await close();
    },
  };
}
