import { simpleParser, type AddressObject } from "mailparser";
import { SMTPServer } from "smtp-server";
import { mailbox } from "./mailbox";

const MAX_KEPT = 500;

function addresses(value: AddressObject | AddressObject[] | undefined): string[] {
  const list = Array.isArray(value) ? value : value ? [value] : [];
  return list.flatMap((a) => a.value.map((v) => v.address ?? "").filter(Boolean));
}

/**
 * A local SMTP server that keeps every message in memory for the dev outbox page and the browser tests.
 * It listens on loopback only and accepts mail without authentication, so it must never face a network.
 */
export async function startMailCatcher(port: number): Promise<{ port: number; close(): Promise<void> }> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    size: 5 * 1024 * 1024,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((parsed) => {
          const box = mailbox();
          box.messages.unshift({
            id: box.nextId++,
            to: addresses(parsed.to),
            from: addresses(parsed.from)[0] ?? "",
            subject: parsed.subject ?? "",
            text: parsed.text ?? "",
            html: typeof parsed.html === "string" ? parsed.html : "",
            receivedAt: new Date().toISOString(),
          });
          box.messages.length = Math.min(box.messages.length, MAX_KEPT);
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, "127.0.0.1", () => resolve());
  });
  const address = server.server.address();
  mailbox().running = true;
  return {
    port: typeof address === "object" && address ? address.port : port,
    close: () =>
      new Promise<void>((resolve) => {
        mailbox().running = false;
        server.close(() => resolve());
      }),
  };
}
