import { data, Form, Link, redirect, useNavigation } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { buttonClass } from "~/components/ui/button";
import { Field, FormMessage } from "~/components/ui/field";
import { clearPendingCookie, readPending, startSession } from "~/.server/auth";
import { pageFailure } from "~/.server/replies";
import { consume } from "~/.server/security/rate-limits";
import { verifySecondStep } from "~/.server/services/two-step";
import type { Route } from "./+types/login-two-step";

export const meta: Route.MetaFunction = () => [{ title: "Two-step sign-in · Pacewright" }];

// Public page: the signed pending cookie from the password step says whose code this is; without it, start over.
export async function loader({ request }: Route.LoaderArgs) {
  if (!(await readPending(request))) throw redirect("/login");
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  const pending = await readPending(request);
  if (!pending) throw redirect("/login");
  const code = String((await request.formData()).get("code") ?? "");
  try {
    // Counted before the code is checked, per account: six guesses per quarter hour.
    await consume(["twoStepUser", String(pending.user.id)]);
  } catch (err) {
    return pageFailure(err, (e) => ({ error: e.message }));
  }
  if (!code.trim()) return data({ error: "Enter the code from your app, or a recovery code." }, { status: 400 });
  if (!(await verifySecondStep(pending.user, code))) {
    return data({ error: "That code does not match. Enter the newest code from your app, or an unused recovery code." }, { status: 400 });
  }
  const headers = new Headers();
  headers.append("Set-Cookie", await startSession(pending.user, request));
  headers.append("Set-Cookie", await clearPendingCookie());
  return redirect(pending.redirectTo, { headers });
}

export default function TwoStep({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  return (
    <AuthFrame
      title="Two-step sign-in"
      lead="Enter the six-digit code your authenticator app shows for Pacewright."
      footer={
        <Link to="/login" className="text-teal underline">
          Start over
        </Link>
      }
    >
      <Form method="post" className="flex flex-col gap-4">
        {actionData?.error && <FormMessage>{actionData.error}</FormMessage>}
        <Field label="Code" name="code" inputMode="text" autoComplete="one-time-code" autoFocus required hint="Lost your phone? Enter one of your recovery codes instead (each works once)." />
        <button type="submit" className={buttonClass("primary", "w-full py-2.5")} disabled={busy}>
          {busy ? "Checking…" : "Continue"}
        </button>
      </Form>
    </AuthFrame>
  );
}
