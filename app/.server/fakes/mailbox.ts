export interface CaughtMail {
  id: number;
  to: string[];
  from: string;
  subject: string;
  text: string;
  html: string;
  receivedAt: string;
}

declare global {
  // The catcher is started by the launcher and read by the app's pages: globalThis is what both share in-process.
  var __pacewrightMailbox: { nextId: number; messages: CaughtMail[]; running: boolean } | undefined;
}

export function mailbox() {
  globalThis.__pacewrightMailbox ??= { nextId: 1, messages: [], running: false };
  return globalThis.__pacewrightMailbox;
}
