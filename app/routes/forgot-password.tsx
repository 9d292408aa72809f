import { data, Form, Link, useNavigation } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { buttonClass } from "~/components/ui/button";
import { Field, FormMessage } from "~/components/ui/field";
import { requestPasswordReset } from "~/.server/services/accounts";
import { forgotSchema, parseForm } from "~/lib/forms";
import { clientKey, consumeOr429 } from "~/.server/security/rate-limits";
import type { Route } from "./+types/forgot-password";

export const meta: Route.MetaFunction = () => [{ title: "Reset your password · Pacewright" }];

export async function action({ request, context }: Route.ActionArgs) {
  const parsed = parseForm(forgotSchema, await request.formData());
  if (!parsed.ok) return data({ sent: false, fieldErrors: parsed.fieldErrors, values: parsed.values }, { status: 400 });
  // Counted per typed address whether or not it has an account, so the limit reveals nothing either.
  await consumeOr429(["resetClient", clientKey(context)], ["resetAddress", parsed.data.email]);
  await requestPasswordReset(parsed.data.email);
  return { sent: true, fieldErrors: {}, values: { email: parsed.data.email } };
}

export default function ForgotPassword({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const errors: Record<string, string | undefined> = actionData?.fieldErrors ?? {};
  return (
    <AuthFrame
      title="Reset your password"
      lead="We e-mail you a link that works once, for one hour."
      footer={<Link to="/login" className="text-teal underline">Back to sign in</Link>}
    >
      {actionData?.sent ? (
        <FormMessage tone="ok">
          If an account uses {actionData.values.email}, a reset link is on its way. Check your inbox.
        </FormMessage>
      ) : (
        <Form method="post" className="flex flex-col gap-4" noValidate>
          <Field label="E-mail" name="email" type="email" autoComplete="email" defaultValue={actionData?.values?.email} error={errors.email} required />
          <button type="submit" className={buttonClass("primary", "w-full py-2.5")} disabled={busy}>
            {busy ? "Sending…" : "Send the reset link"}
          </button>
        </Form>
      )}
    </AuthFrame>
  );
}
