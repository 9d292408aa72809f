import { createCookieSessionStorage, redirect } from "react-router";
import { secureCookies } from "./auth";
import { env } from "./env";
import type { Toast } from "~/lib/forms";

/**
 * One-time notes ("Saved to your shelf.") that outlive a redirect. They ride in a signed cookie rather than the
 * query string so a reload, a bookmark or a shared link never repeats them, and the root loader reads and clears
 * them (`readToast`), so each is shown once.
 */
export type { Toast };

const storage = createCookieSessionStorage<Record<string, never>, { toast: Toast }>({
  cookie: {
    name: "pw_flash",
    httpOnly: true,
    sameSite: "lax",
    path: "/",
    // A note nobody came back for is stale after a few minutes.
    maxAge: 5 * 60,
    get secrets() {
      return [env().sessionSecret];
    },
  },
});

/** A Set-Cookie value that carries `toast` to the next page the browser loads. */
export async function toastCookie(request: Request, toast: Toast) {
  const session = await storage.getSession(request.headers.get("Cookie"));
  session.flash("toast", toast);
  return storage.commitSession(session, { secure: secureCookies() });
}

/** A redirect that shows `message` once on the page it lands on. */
export async function redirectWithToast(
  request: Request,
  to: string,
  message: string,
  tone: Toast["tone"] = "ok",
  init: ResponseInit = {},
) {
  const headers = new Headers(init.headers);
  headers.append("Set-Cookie", await toastCookie(request, { tone, message }));
  return redirect(to, { ...init, headers });
}

/** The waiting note, if any, and the header that clears it; no header at all when there was none. */
export async function readToast(request: Request): Promise<{ toast: Toast | null; headers: Headers }> {
  const headers = new Headers();
  const cookie = request.headers.get("Cookie");
  if (!cookie?.includes("pw_flash=")) return { toast: null, headers };
  const session = await storage.getSession(cookie);
  const toast = session.get("toast") ?? null;
  headers.append("Set-Cookie", await storage.commitSession(session, { secure: secureCookies() }));
  return { toast, headers };
}
