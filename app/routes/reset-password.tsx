import { data, Form, Link, redirect, useNavigation } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { buttonClass } from "~/components/ui/button";
import { Field, FormMessage } from "~/components/ui/field";
import { pageFailure } from "~/.server/replies";
import { checkResetToken, resetPassword } from "~/.server/services/accounts";
import { RESET_LINK_DEAD } from "~/lib/messages";
import { parseForm, resetSchema } from "~/lib/forms";
import { clientKey, consumeOr429 } from "~/.server/security/rate-limits";
import type { Route } from "./+types/reset-password";

export const meta: Route.MetaFunction = () => [{ title: "Choose a new password · Pacewright" }];

// Public page: the token in the URL is the credential, checked before anything is shown.
export async function loader({ params }: Route.LoaderArgs) {
  return { valid: await checkResetToken(params.token) };
}

export async function action({ request, params, context }: Route.ActionArgs) {
  await consumeOr429(["tokenClient", clientKey(context)]);
  const parsed = parseForm(resetSchema, await request.formData());
  if (!parsed.ok) return data({ fieldErrors: parsed.fieldErrors }, { status: 400 });
  try {
    await resetPassword(params.token, parsed.data.password);
  } catch (err) {
    return pageFailure(err, (e) => ({ fieldErrors: { form: e.message } }));
  }
  return redirect("/login?reset=1");
}

export default function ResetPassword({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const errors: Record<string, string | undefined> = actionData?.fieldErrors ?? {};
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
      <Form method="post" className="flex flex-col gap-4" noValidate>
        {errors.form && <FormMessage>{errors.form}</FormMessage>}
        <Field label="New password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." error={errors.password} required minLength={10} />
        <Field label="Repeat it" name="confirm" type="password" autoComplete="new-password" error={errors.confirm} required />
        <button type="submit" className={buttonClass("primary", "w-full py-2.5")} disabled={busy}>
          {busy ? "Saving…" : "Save the new password"}
        </button>
      </Form>
    </AuthFrame>
  );
}
