import { Form, Link, redirect, useNavigation } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { buttonClass } from "~/components/ui/button";
import { Field, FormMessage } from "~/components/ui/field";
import { startSignIn } from "~/.server/auth";
import { clearPendingCookie, readPending } from "~/.server/auth";
import { formFailure } from "~/.server/replies";
import { consume } from "~/.server/security/rate-limits";
import { verifySecondStep } from "~/.server/services/two-step";
import { fieldProps, parseSubmission, refuse, twoStepSchema, useSchemaForm } from "~/lib/forms";
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
  const submission = parseSubmission(await request.formData(), twoStepSchema);
  try {
    // Counted before the code is checked (an empty one too), per account: six guesses per quarter hour.
    await consume(["twoStepUser", String(pending.user.id)]);
  } catch (err) {
    return formFailure(err, submission);
  }
  if (submission.status !== "success") return refuse(submission);
  if (!(await verifySecondStep(pending.user, submission.value.code))) {
    return refuse(submission, {
      fields: { code: "That code does not match. Enter the newest code from your app, or an unused recovery code." },
    });
  }
  const headers = new Headers();
  headers.append("Set-Cookie", await startSignIn(pending.user, request));
  headers.append("Set-Cookie", await clearPendingCookie());
  return redirect(pending.redirectTo, { headers });
}

export default function TwoStep({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const [form, fields] = useSchemaForm(twoStepSchema, actionData);
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
      <Form method="post" id={form.id} onSubmit={form.onSubmit} className="flex flex-col gap-4" noValidate>
        {form.errors?.[0] && <FormMessage>{form.errors[0]}</FormMessage>}
        <Field
          label="Code"
          inputMode="text"
          autoComplete="one-time-code"
          // eslint-disable-next-line jsx-a11y/no-autofocus -- this page has one field, the code the person came to type
          autoFocus
          required
          hint="Lost your phone? Enter one of your recovery codes instead (each works once)."
          {...fieldProps(fields.code)}
        />
        <button type="submit" className={buttonClass("primary", "w-full py-2.5")} disabled={busy}>
          {busy ? "Checking…" : "Continue"}
        </button>
      </Form>
    </AuthFrame>
  );
}
