import { data, Form, Link, redirect, useNavigation, useSearchParams } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { buttonClass } from "~/components/ui/button";
import { Field, FormMessage } from "~/components/ui/field";
import { authenticator, getUser, guardSignIn, homeFor, pendingCookieFor, startSession, twoStepOn } from "~/.server/auth";
import { pageFailure } from "~/.server/replies";
import { clientKey } from "~/.server/security/rate-limits";
import { safeRedirect } from "~/.server/http";
import type { Route } from "./+types/login";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await getUser(request);
  if (user) throw redirect(homeFor(user.role));
  return null;
}

export async function action({ request, context }: Route.ActionArgs) {
  const form = await request.clone().formData();
  const email = String(form.get("email") ?? "");
  try {
    const guard = await guardSignIn(email, clientKey(context));
    const user = await authenticator.authenticate("password", request);
    await guard.succeeded();
    const to = safeRedirect(form.get("redirectTo"), homeFor(user.role));
    // With two-step sign-in on, the password alone opens no session: the code page does.
    if (twoStepOn(user)) return redirect("/login/two-step", { headers: { "Set-Cookie": await pendingCookieFor(user, to) } });
    const cookie = await startSession(user, request);
    return redirect(to, { headers: { "Set-Cookie": cookie } });
  } catch (err) {
    return pageFailure(err, (e) => ({ error: e.message, email }));
  }
}

export default function Login({ actionData }: Route.ComponentProps) {
  const [params] = useSearchParams();
  const busy = useNavigation().state === "submitting";
  return (
    <AuthFrame
      title="Sign in"
      footer={
        <>
          New here? <Link to="/signup" className="text-teal underline">Create an account</Link>
        </>
      }
    >
      <Form method="post" className="flex flex-col gap-4">
        {actionData?.error && <FormMessage>{actionData.error}</FormMessage>}
        {!actionData && params.get("reset") && (
          <FormMessage tone="ok">Your password was changed. Sign in with the new one.</FormMessage>
        )}
        <input type="hidden" name="redirectTo" value={params.get("redirectTo") ?? ""} />
        <Field label="E-mail" name="email" type="email" autoComplete="email" defaultValue={actionData?.email} required />
        <Field label="Password" name="password" type="password" autoComplete="current-password" required />
        <button type="submit" className={buttonClass("primary", "w-full py-2.5")} disabled={busy}>
          {busy ? "Signing in…" : "Sign in"}
        </button>
        <Link to="/forgot-password" className="text-center text-sm text-teal underline">
          Forgot your password?
        </Link>
      </Form>
    </AuthFrame>
  );
}
