import fs from "node:fs/promises";
import path from "node:path";
import nodemailer, { type Transporter } from "nodemailer";
import type { Transaction } from "sequelize";
import { claimDueIds } from "./claims";
import { env } from "./env";
import { OutboundEmail } from "./models";

const TEMPLATE_DIR = path.resolve(process.env.TEMPLATE_DIR ?? "templates/email");
const MAX_ATTEMPTS = 12;
/** Long enough for one SMTP delivery; a sender that died mid-send leaves its rows to another after this. */
const SEND_LEASE_MS = 120_000;

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);

/**
 * Fills `{{name}}` placeholders. HTML parts escape every value; `{{{name}}}` is never offered, so a name typed by
 * a user cannot inject markup into a message.
 */
export function fill(template: string, vars: Record<string, string | number>, html: boolean): string {
  return template.replace(/\{\{\s*([a-zA-Z0-9_]+)\s*\}\}/g, (_, key: string) => {
    if (!(key in vars)) throw new Error(`E-mail template is missing a value for {{${key}}}`);
    const value = String(vars[key]);
    return html ? escapeHtml(value) : value;
  });
}

export async function renderEmail(template: string, vars: Record<string, string | number>) {
  const [text, html, layout] = await Promise.all([
    fs.readFile(path.join(TEMPLATE_DIR, `${template}.txt`), "utf8"),
    fs.readFile(path.join(TEMPLATE_DIR, `${template}.html`), "utf8"),
    fs.readFile(path.join(TEMPLATE_DIR, "_layout.html"), "utf8"),
  ]);
  // The plain-text part's first line is "Subject: …"; one file then holds both the subject and the text.
  const [first, ...rest] = text.split("\n");
  if (!first.startsWith("Subject:")) throw new Error(`${template}.txt must start with a Subject: line`);
  const subject = fill(first.slice("Subject:".length).trim(), vars, false);
  const body = fill(html, vars, true);
  return {
    subject,
    text: fill(rest.join("\n").trimStart(), vars, false),
    html: layout.replace("{{content}}", body).replace("{{subject}}", escapeHtml(subject)),
  };
}

/**
 * Writes a message to the outbox inside the caller's transaction: if the action rolls back, no message leaves;
 * if it commits, the sender delivers it, retrying until it goes through.
 */
export async function queueEmail(
  opts: { to: string; template: string; vars: Record<string, string | number> },
  transaction?: Transaction,
) {
  const rendered = await renderEmail(opts.template, opts.vars);
  const row = await OutboundEmail.create(
    {
      toAddress: opts.to,
      subject: rendered.subject,
      template: opts.template,
      textBody: rendered.text,
      htmlBody: rendered.html,
      nextAttemptAt: new Date(),
    },
    { transaction },
  );
  if (transaction) transaction.afterCommit(() => kickMailer());
  else kickMailer();
  return row;
}

let transporter: Transporter | null = null;
function transport(): Transporter {
  if (!transporter) {
    const e = env();
    transporter = e.smtpUrl
      ? nodemailer.createTransport(e.smtpUrl)
      : nodemailer.createTransport({ host: "127.0.0.1", port: e.smtpCatcherPort, secure: false, ignoreTLS: true });
  }
  return transporter;
}

export function resetTransport() {
  transporter?.close();
  transporter = null;
}

/**
 * Claims up to `limit` due messages for this sender with the claim the job runner uses (claims.ts): several app
 * instances split the outbox without waiting on each other and never take one row twice. The lease covers one
 * delivery; a failure then sets the backoff itself.
 */
async function claimDue(limit: number): Promise<OutboundEmail[]> {
  const ids = await claimDueIds("outbound_emails", { limit, leaseMs: SEND_LEASE_MS });
  if (!ids.length) return [];
  return OutboundEmail.findAll({ where: { id: ids }, order: [["id", "ASC"]] });
}

/** Sends every message that is due. Each row is claimed first, so two senders never deliver one twice. */
export async function deliverPending(limit = 25): Promise<{ sent: number; failed: number }> {
  let sent = 0;
  let failed = 0;
  for (const mail of await claimDue(limit)) {
    try {
      const info = await transport().sendMail({
        from: env().mailFrom,
        to: mail.toAddress,
        subject: mail.subject,
        text: mail.textBody,
        html: mail.htmlBody,
      });
      await OutboundEmail.update(
        { status: "sent", sentAt: new Date(), messageId: String(info.messageId ?? ""), lastError: null },
        { where: { id: mail.id } },
      );
      sent++;
    } catch (err) {
      failed++;
      // Only while the row still carries this claim: a sender that took it again after the lease owns it now.
      await OutboundEmail.update(
        {
          lastError: String((err as Error).message ?? err),
          status: mail.attempts >= MAX_ATTEMPTS ? "failed" : "pending",
          nextAttemptAt: new Date(Date.now() + backoffMs(mail.attempts)),
        },
        { where: { id: mail.id, attempts: mail.attempts } },
      );
    }
  }
  return { sent, failed };
}

/** 10 s, 20 s, 40 s … capped at one hour. */
export function backoffMs(attempt: number) {
  return Math.min(3600_000, 10_000 * 2 ** Math.max(0, attempt - 1));
}

declare global {
  var __pacewrightMailer: { timer: NodeJS.Timeout | null; busy: boolean; again: boolean } | undefined;
}

async function runOnce() {
  const state = globalThis.__pacewrightMailer;
  if (!state) return;
  if (state.busy) {
    state.again = true;
    return;
  }
  state.busy = true;
  try {
    do {
      state.again = false;
      await deliverPending();
    } while (state.again);
  } catch (err) {
    console.error("[mail] delivery run failed:", err);
  } finally {
    state.busy = false;
  }
}

/** Starts the background sender (the app server calls this once; tests call deliverPending directly). */
export function startMailer(intervalMs = 5_000) {
  if (globalThis.__pacewrightMailer?.timer) return;
  globalThis.__pacewrightMailer = { timer: null, busy: false, again: false };
  globalThis.__pacewrightMailer.timer = setInterval(runOnce, intervalMs);
  globalThis.__pacewrightMailer.timer.unref();
  void runOnce();
}

/** Stops the sender and waits for a delivery run in progress, so a shutting-down instance leaves no row half-sent. */
export async function stopMailer(timeoutMs = 15_000) {
  const state = globalThis.__pacewrightMailer;
  if (!state) return;
  if (state.timer) clearInterval(state.timer);
  state.timer = null;
  const until = Date.now() + timeoutMs;
  while (state.busy && Date.now() < until) await new Promise((r) => setTimeout(r, 50));
}

export function kickMailer() {
  if (globalThis.__pacewrightMailer) void runOnce();
}
