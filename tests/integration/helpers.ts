import { hashPassword } from "~/.server/auth";
import { pageUrl } from "~/.server/http";
import { CoachAthlete, User, type Role } from "~/.server/models";
import { requestContext } from "~/.server/security/load-context";
import type { RouterContextProvider } from "react-router";

export const BASE = "http://localhost:3999";

let counter = 0;
export const uniqueEmail = (prefix = "user") => `${prefix}.${Date.now().toString(36)}.${++counter}@example.test`;

export async function makeUser(
  opts: Partial<{ role: Role; email: string; name: string; password: string; timezone: string }> = {},
) {
  return User.create({
    role: opts.role ?? "athlete",
    email: opts.email ?? uniqueEmail(opts.role ?? "athlete"),
    name: opts.name ?? "Test Person",
    passwordHash: await hashPassword(opts.password ?? "correct-horse-battery"),
    timezone: opts.timezone ?? "UTC",
  });
}

export async function makeCoachWithAthlete() {
  const coach = await makeUser({ role: "coach", name: "Coach C" });
  const athlete = await makeUser({ role: "athlete", name: "Athlete A" });
  await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
  return { coach, athlete };
}

export function formRequest(
  path: string,
  fields: Record<string, string | string[]>,
  opts: { cookie?: string; method?: string } = {},
) {
  const body = new URLSearchParams();
  for (const [k, v] of Object.entries(fields)) for (const one of Array.isArray(v) ? v : [v]) body.append(k, one);
  return new Request(BASE + path, {
    method: opts.method ?? "POST",
    body,
    headers: {
      "Content-Type": "application/x-www-form-urlencoded",
      Origin: BASE,
      ...(opts.cookie ? { Cookie: opts.cookie } : {}),
    },
  });
}

export function getRequest(path: string, cookie?: string) {
  return new Request(BASE + path, { headers: cookie ? { Cookie: cookie } : {} });
}

let clients = 0;
/** A load context as scripts/server.ts builds it; each call is a new client unless one is given. */
export const clientContext = (clientAddress = `198.51.100.${++clients % 250}-${clients}`) =>
  requestContext({ clientAddress });

const bare = new WeakSet<Request>();
/** Marks a request to be sent as a non-browser client would: run() adds no Origin header to it. */
export function withoutOrigin(request: Request) {
  bare.add(request);
  return request;
}

/**
 * Route functions are called the way React Router calls them (the raw request beside its page `url`); thrown
 * Responses are returned for inspection.
 * Requests to this site get a same-origin Origin header, as a browser on one of our pages sends, unless they
 * carry one already or were marked withoutOrigin().
 */
export async function run<T>(
  fn: (args: any) => Promise<T>,
  request: Request,
  params: Record<string, string> = {},
  context: RouterContextProvider = clientContext(),
) {
  if (
    !bare.has(request) &&
    !request.headers.has("origin") &&
    !request.headers.has("sec-fetch-site") &&
    new URL(request.url).origin === BASE
  ) {
    request.headers.set("Origin", BASE);
  }
  try {
    return await fn({ request, url: pageUrl(request), params, context });
  } catch (err) {
    if (err instanceof Response) return err;
    throw err;
  }
}

/** `data()` results carry their init; Responses carry status. Both are read the same way here. */
export function statusOf(result: unknown): number {
  if (result instanceof Response) return result.status;
  const r = result as { init?: { status?: number } | null; type?: string };
  if (r && r.type === "DataWithResponseInit") return r.init?.status ?? 200;
  return 200;
}

export function payloadOf<T = any>(result: unknown): T {
  const r = result as { type?: string; data?: unknown };
  return (r && r.type === "DataWithResponseInit" ? r.data : result) as T;
}

export function cookieFrom(response: Response): string {
  const set = response.headers.get("set-cookie");
  if (!set) throw new Error("no Set-Cookie on response");
  return set.split(";")[0];
}

export async function signIn(email: string, password = "correct-horse-battery") {
  const { action } = await import("~/routes/login");
  const res = await run(action, formRequest("/login", { email, password }));
  if (!(res instanceof Response) || res.status !== 302) throw new Error(`sign-in failed for ${email}`);
  return cookieFrom(res);
}

/**
 * The messages of a form reply (conform's `SubmissionResult`), first one per field; the whole form's message
 * (conform keeps it under "") is read as `form`.
 */
export function fieldErrorsOf(result: unknown): Record<string, string> {
  const reply = payloadOf<{ error?: Record<string, string[] | null> }>(result);
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(reply?.error ?? {})) if (v?.[0]) out[k === "" ? "form" : k] = v[0];
  return out;
}

/** The one-time note a redirect carries in its flash cookie, read the way the root loader reads it. */
export async function toastOf(response: Response) {
  const { readToast } = await import("~/.server/flash");
  const flash = response.headers.getSetCookie().find((c) => c.startsWith("pw_flash="));
  if (!flash) return null;
  return (await readToast(new Request(BASE, { headers: { Cookie: flash.split(";")[0] } }))).toast;
}
