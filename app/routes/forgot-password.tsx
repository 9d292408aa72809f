import { Form, Link, useNavigation } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { buttonClass } from "~/components/ui/button";
import { Field, FormMessage } from "~/components/ui/field";
import { requestPasswordReset } from "~/.server/services/password-resets";
import { accepted, fieldProps, forgotSchema, parseSubmission, refuse, useSchemaForm } from "~/lib/forms";
import { clientKey, consumeOr429 } from "~/.server/security/rate-limits";
import type { Route } from "./+types/forgot-password";

export const meta: Route.MetaFunction = () => [{ title: "Reset your password · Pacewright" }];

export async function action({ request, context }: Route.ActionArgs) {
  const submission = parseSubmission(await request.formData(), forgotSchema);
  if (submission.status !== "success") return refuse(submission);
  // Counted per typed address whether or not it has an account, so the limit reveals nothing either.
  await consumeOr429(["resetClient", clientKey(context)], ["resetAddress", submission.value.email]);
  await requestPasswordReset(submission.value.email);
  return accepted(
    submission,
    `If an account uses ${submission.value.email}, a reset link is on its way. Check your inbox.`,
  );
}

export default function ForgotPassword({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const [form, fields] = useSchemaForm(forgotSchema, actionData);
  const sent = actionData?.status === "success" && "message" in actionData ? actionData.message : null;
  return (
    <AuthFrame
      title="Reset your password"
      lead="We e-mail you a link that works once, for one hour."
      footer={
        <Link to="/login" className="text-teal underline">
          Back to sign in
        </Link>
      }
    >
      {sent ? (
        <FormMessage tone="ok">{sent}</FormMessage>
      ) : (
        <Form method="post" id={form.id} onSubmit={form.onSubmit} className="flex flex-col gap-4" noValidate>
          <Field label="E-mail" type="email" autoComplete="email" required {...fieldProps(fields.email)} />
          <button type="submit" className={buttonClass("primary", "w-full py-2.5")} disabled={busy}>
            {busy ? "Sending…" : "Send the reset link"}
          </button>
        </Form>
      )}
    </AuthFrame>
  );
}
