import { Form, Link, useNavigation } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { buttonClass } from "~/components/ui/button";
import { Field, FormMessage } from "~/components/ui/field";
import { formFailure } from "~/.server/replies";
import { checkResetToken, resetPassword } from "~/.server/services/password-resets";
import { RESET_LINK_DEAD } from "~/lib/messages";
import { fieldProps, parseSubmission, refuse, resetSchema, useSchemaForm } from "~/lib/forms";
import { redirectWithToast } from "~/.server/flash";
import { clientKey, consumeOr429 } from "~/.server/security/rate-limits";
import type { Route } from "./+types/reset-password";

export const meta: Route.MetaFunction = () => [{ title: "Choose a new password · Pacewright" }];

// Public page: the token in the URL is the credential, checked before anything is shown.
export async function loader({ params }: Route.LoaderArgs) {
  return { valid: await checkResetToken(params.token) };
}

export async function action({ request, params, context }: Route.ActionArgs) {
  await consumeOr429(["tokenClient", clientKey(context)]);
  const submission = parseSubmission(await request.formData(), resetSchema);
  if (submission.status !== "success") return refuse(submission);
  try {
    await resetPassword(params.token, submission.value.password);
  } catch (err) {
    return formFailure(err, submission);
  }
  return redirectWithToast(request, "/login", "Your password was changed. Sign in with the new one.");
}

export default function ResetPassword({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const [form, fields] = useSchemaForm(resetSchema, actionData);
  if (!loaderData.valid) {
    return (
      <AuthFrame title="This link no longer works">
        <FormMessage>{RESET_LINK_DEAD}</FormMessage>
        <Link to="/forgot-password" className={buttonClass("primary", "mt-4 w-full")}>
          Send a new link
        </Link>
      </AuthFrame>
    );
  }
  return (
    <AuthFrame title="Choose a new password" lead="Every device signed in to this account will be signed out.">
      <Form method="post" id={form.id} onSubmit={form.onSubmit} className="flex flex-col gap-4" noValidate>
        {form.errors?.[0] && <FormMessage>{form.errors[0]}</FormMessage>}
        <Field
          label="New password"
          type="password"
          autoComplete="new-password"
          hint="At least 10 characters."
          required
          minLength={10}
          {...fieldProps(fields.password)}
        />
        <Field label="Repeat it" type="password" autoComplete="new-password" required {...fieldProps(fields.confirm)} />
        <button type="submit" className={buttonClass("primary", "w-full py-2.5")} disabled={busy}>
          {busy ? "Saving…" : "Save the new password"}
        </button>
      </Form>
    </AuthFrame>
  );
}
