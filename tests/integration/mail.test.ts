import net from "node:net";
import { describe, expect, it } from "vitest";
import { writeTransaction } from "~/.server/db";
import { resetEnvCache } from "~/.server/env";
import { startMailCatcher } from "~/.server/fakes/mail-catcher";
import { mailbox } from "~/.server/fakes/mailbox";
import { deliverPending, fill, queueEmail, renderEmail, resetTransport } from "~/.server/mail";
import { OutboundEmail } from "~/.server/models";

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const srv = net.createServer().listen(0, "127.0.0.1", () => {
      const port = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(port));
    });
  });
}

describe("e-mail outbox", () => {
  it("escapes values in the HTML part and refuses a template with a missing value", async () => {
    expect(fill("<p>{{name}}</p>", { name: "<b>Al & Bo</b>" }, true)).toBe("<p>&lt;b&gt;Al &amp; Bo&lt;/b&gt;</p>");
    expect(fill("{{name}}", { name: "<b>" }, false)).toBe("<b>");
    expect(() => fill("{{missing}}", {}, true)).toThrow(/missing a value/);
    const r = await renderEmail("password-reset", { name: "Lee", link: "http://x/reset" });
    expect(r.subject).toBe("Reset your Pacewright password");
    expect(r.text).toContain("http://x/reset");
    expect(r.html).toContain('href="http://x/reset"');
  });

  it("writes nothing when the surrounding transaction rolls back", async () => {
    const before = await OutboundEmail.count();
    await expect(
      writeTransaction(async (t) => {
        await queueEmail(
          { to: "rollback@example.test", template: "password-reset", vars: { name: "R", link: "l" } },
          t,
        );
        throw new Error("boom");
      }),
    ).rejects.toThrow("boom");
    expect(await OutboundEmail.count()).toBe(before);
  });

  it("keeps a message pending while SMTP is down and delivers it once the server answers", async () => {
    const port = await freePort();
    process.env.SMTP_CATCHER_PORT = String(port);
    resetEnvCache();
    resetTransport();
    const row = await queueEmail({
      to: "retry@example.test",
      template: "password-reset",
      vars: { name: "Retry", link: "http://x/r" },
    });

    const first = await deliverPending();
    expect(first.failed).toBeGreaterThanOrEqual(1);
    await row.reload();
    expect(row.status).toBe("pending");
    expect(row.attempts).toBe(1);
    expect(row.lastError).toBeTruthy();
    expect(row.nextAttemptAt.getTime()).toBeGreaterThan(Date.now());

    // Not due yet: a second run leaves it alone.
    expect((await deliverPending()).sent).toBe(0);

    const catcher = await startMailCatcher(port);
    try {
      await OutboundEmail.update({ nextAttemptAt: new Date(Date.now() - 1) }, { where: { id: row.id } });
      const second = await deliverPending();
      expect(second.sent).toBeGreaterThanOrEqual(1);
      await row.reload();
      expect(row.status).toBe("sent");
      expect(row.attempts).toBe(2);
      const caught = mailbox().messages.find((m) => m.to.includes("retry@example.test"));
      expect(caught?.subject).toBe("Reset your Pacewright password");
      expect(caught?.text).toContain("http://x/r");
      // Sent messages are never sent again.
      expect((await deliverPending()).sent).toBe(0);
    } finally {
      await catcher.close();
      resetTransport();
    }
  });
});
