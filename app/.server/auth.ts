import bcrypt from "bcryptjs";
import { createCookie, redirect } from "react-router";
import { Authenticator } from "remix-auth";
import { FormStrategy } from "remix-auth-form";
import { z } from "zod";
import { writeTransaction } from "./db";
import { env } from "./env";
import { forbidden, pageUrl, requireSameOrigin } from "./http";
import { SignInSession, User, type Role } from "./models";
import { clear, consume, giveBack } from "./security/rate-limits";
import { hashToken, newToken } from "./tokens";
import { DomainError } from "./errors";

export const BCRYPT_COST = 11;
const SIGN_IN_DAYS = 30;
export const WRONG_CREDENTIALS = "That e-mail and password do not match an account.";

export const signInCookie = createCookie("pw_session", {
  httpOnly: true,
  sameSite: "lax",
  path: "/",
  maxAge: SIGN_IN_DAYS * 24 * 3600,
  get secrets() {
    return [env().sessionSecret];
  },
});

/**
 * Secure whenever the public URL is https (production and any https demo); decided per response because
 * createCookie reads its options once, when the module loads.
 */
export const secureCookies = () => env().appUrl.startsWith("https://");

export function hashPassword(password: string) {
  return bcrypt.hash(password, BCRYPT_COST);
}

// Compared against when the address is unknown. Same cost as real hashes, so an unknown address costs the same
// work and answers in the same time as a wrong password for a known one.
let dummyHash: Promise<string> | null = null;
export function dummyPasswordHash() {
  dummyHash ??= bcrypt.hash("pacewright-dummy-password", BCRYPT_COST);
  return dummyHash;
}

const credentials = z.object({
  email: z.string().trim().toLowerCase().email("Enter your e-mail address."),
  password: z.string().min(1, "Enter your password."),
});

export const authenticator = new Authenticator<User>();
authenticator.use(
  new FormStrategy(async ({ form }) => {
    const parsed = credentials.safeParse({ email: form.get("email"), password: form.get("password") });
    if (!parsed.success) throw new DomainError("invalid", parsed.error.issues[0].message);
    const { email, password } = parsed.data;

    const user = await User.findOne({ where: { email } });
    const ok = await bcrypt.compare(password, user?.passwordHash ?? (await dummyPasswordHash()));
    if (!user || !ok) throw new DomainError("invalid", WRONG_CREDENTIALS);
    return user;
  }),
  "password",
);

/**
 * Counts a sign-in attempt against the address and the client *before* the password is checked: each attempt is
 * one atomic increment, so parallel guesses are cut off at the limit instead of all being checked. Call
 * `succeeded()` after a good password: it clears the address and gives the client its point back.
 */
export async function guardSignIn(email: string, client: string) {
  const address = email.trim().toLowerCase();
  await consume(["signInClient", client], ...(address ? ([["signInAddress", address]] as const) : []));
  return {
    async succeeded() {
      if (address) await clear("signInAddress", address);
      await giveBack("signInClient", client);
    },
  };
}

/** Starts a new sign-in session row (a fresh id every sign-in) and returns the Set-Cookie header value. */
export async function startSignIn(user: User, request: Request): Promise<string> {
  const id = newToken();
  await SignInSession.create({
    id: hashToken(id),
    userId: user.id,
    expiresAt: new Date(Date.now() + SIGN_IN_DAYS * 24 * 3600 * 1000),
    userAgent: request.headers.get("user-agent")?.slice(0, 255) ?? null,
  });
  return signInCookie.serialize(id, { secure: secureCookies() });
}

async function signInIdFrom(request: Request): Promise<string | null> {
  const value = await signInCookie.parse(request.headers.get("cookie"));
  const id = typeof value === "string" && value.length > 0 ? value : null;
  // Every use of the sign-in cookie goes through here, so no write that relies on it can skip the origin check.
  if (id) requireSameOrigin(request, env().appUrl);
  return id;
}

const SEEN_EVERY_MS = 5 * 60 * 1000;

export async function getUser(request: Request): Promise<User | null> {
  const id = await signInIdFrom(request);
  if (!id) return null;
  const row = await SignInSession.findByPk(hashToken(id));
  if (!row || row.expiresAt.getTime() <= Date.now()) return null;
  // For the devices list; written at most every few minutes so reads stay reads.
  if (!row.lastSeenAt || Date.now() - row.lastSeenAt.getTime() > SEEN_EVERY_MS) {
    await writeTransaction((transaction) =>
      SignInSession.update({ lastSeenAt: new Date() }, { where: { id: row.id }, transaction }),
    );
  }
  return User.findByPk(row.userId);
}

/** The stored id (hash) of the sign-in session this request rides on, to tell "this device" apart. */
export async function currentSignInKey(request: Request): Promise<string | null> {
  const id = await signInIdFrom(request);
  return id ? hashToken(id) : null;
}

export async function requireUser(request: Request): Promise<User> {
  const user = await getUser(request);
  if (!user) {
    const url = pageUrl(request);
    const back = url.pathname + url.search;
    throw redirect(`/login?redirectTo=${encodeURIComponent(back)}`);
  }
  return user;
}

export async function requireRole(request: Request, role: Role | Role[]): Promise<User> {
  const user = await requireUser(request);
  const allowed = Array.isArray(role) ? role : [role];
  if (!allowed.includes(user.role)) forbidden(`This page is for ${allowed.join(" or ")} accounts.`);
  return user;
}

/** Deletes the sign-in session row, so a copy of the old cookie no longer signs anyone in. */
export async function endSignIn(request: Request): Promise<string> {
  const id = await signInIdFrom(request);
  if (id) await SignInSession.destroy({ where: { id: hashToken(id) } });
  return signInCookie.serialize("", { maxAge: 0, secure: secureCookies() });
}

export function homeFor(role: Role): string {
  return role === "coach" ? "/coach" : role === "admin" ? "/admin/users" : "/athlete";
}

/** Whether the account signs in with a code from an authenticator app as well as its password. */
export const twoStepOn = (user: User) => Boolean(user.totpEnabledAt && user.totpSecret);

/**
 * Between the password and the code: a short-lived signed cookie naming the account. It grants nothing by itself;
 * only a matching code turns it into a sign-in session.
 */
export const pendingSignIn = createCookie("pw_two_step", {
  httpOnly: true,
  sameSite: "lax",
  path: "/login",
  maxAge: 5 * 60,
  get secrets() {
    return [env().sessionSecret];
  },
});

export async function pendingCookieFor(user: User, redirectTo: string) {
  return pendingSignIn.serialize(
    { userId: user.id, until: Date.now() + 5 * 60 * 1000, redirectTo },
    { secure: env().appUrl.startsWith("https://") },
  );
}

export async function readPending(request: Request): Promise<{ user: User; redirectTo: string } | null> {
  const value = (await pendingSignIn.parse(request.headers.get("cookie"))) as {
    userId?: unknown;
    until?: unknown;
    redirectTo?: unknown;
  } | null;
  if (!value || typeof value.userId !== "number" || typeof value.until !== "number" || value.until < Date.now())
    return null;
  const user = await User.findByPk(value.userId);
  if (!user || !twoStepOn(user)) return null;
  return { user, redirectTo: typeof value.redirectTo === "string" ? value.redirectTo : "/" };
}

export const clearPendingCookie = () => pendingSignIn.serialize("", { maxAge: 0 });
