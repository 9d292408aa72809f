import { Form, Link, redirect, useNavigation, useSearchParams } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { buttonClass } from "~/components/ui/button";
import { Field, FormMessage } from "~/components/ui/field";
import { authenticator, getUser, guardSignIn, homeFor, pendingCookieFor, startSignIn, twoStepOn } from "~/.server/auth";
import { formFailure } from "~/.server/replies";
import { clientKey } from "~/.server/security/rate-limits";
import { safeRedirect } from "~/.server/http";
import { fieldProps, parseSubmission, refuse, signInSchema, useSchemaForm } from "~/lib/forms";
import type { Route } from "./+types/login";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await getUser(request);
  if (user) throw redirect(homeFor(user.role));
  return null;
}

export async function action({ request, context }: Route.ActionArgs) {
  const submission = parseSubmission(await request.clone().formData(), signInSchema);
  if (submission.status !== "success") return refuse(submission);
  try {
    const guard = await guardSignIn(submission.value.email, clientKey(context));
    const user = await authenticator.authenticate("password", request);
    await guard.succeeded();
    const to = safeRedirect(submission.value.redirectTo, homeFor(user.role));
    // With two-step sign-in on, the password alone opens no session: the code page does.
    if (twoStepOn(user))
      return redirect("/login/two-step", { headers: { "Set-Cookie": await pendingCookieFor(user, to) } });
    const cookie = await startSignIn(user, request);
    return redirect(to, { headers: { "Set-Cookie": cookie } });
  } catch (err) {
    return formFailure(err, submission);
  }
}

export default function Login({ actionData }: Route.ComponentProps) {
  const [params] = useSearchParams();
  const busy = useNavigation().state === "submitting";
  const [form, fields] = useSchemaForm(signInSchema, actionData);
  return (
    <AuthFrame
      title="Sign in"
      footer={
        <>
          New here?{" "}
          <Link to="/signup" className="text-teal underline">
            Create an account
          </Link>
        </>
      }
    >
      <Form method="post" id={form.id} onSubmit={form.onSubmit} className="flex flex-col gap-4" noValidate>
        {form.errors?.[0] && <FormMessage>{form.errors[0]}</FormMessage>}
        <input type="hidden" name="redirectTo" value={params.get("redirectTo") ?? ""} />
        <Field label="E-mail" type="email" autoComplete="email" required {...fieldProps(fields.email)} />
        <Field
          label="Password"
          type="password"
          autoComplete="current-password"
          required
          {...fieldProps(fields.password)}
        />
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
