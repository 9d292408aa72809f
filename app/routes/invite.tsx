import { data, Form, Link, redirect, useNavigation } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { TimezoneSelect } from "~/components/timezone-select";
import { buttonClass } from "~/components/ui/button";
import { Field, FormMessage } from "~/components/ui/field";
import { getUser, startSession } from "~/.server/auth";
import { pageFailure } from "~/.server/replies";
import { acceptInvitation, findInvitation } from "~/.server/services/accounts";
import { INVITE_DEAD } from "~/lib/messages";
import { acceptInviteSchema, parseForm } from "~/lib/forms";
import { clientKey, consumeOr429 } from "~/.server/security/rate-limits";
import type { Route } from "./+types/invite";

export const meta: Route.MetaFunction = () => [{ title: "Your invitation · Pacewright" }];

// Public page: the token is the credential; a signed-in user is read to decide which form fits.
export async function loader({ request, params }: Route.LoaderArgs) {
  const signedIn = await getUser(request);
  const found = await findInvitation(params.token);
  if (!found) return { valid: false as const };
  return {
    valid: true as const,
    coachName: found.coach.name,
    email: found.invitation.email,
    suggestedName: found.invitation.name ?? "",
    hasAccount: Boolean(found.existing),
    signedInAs: signedIn?.email ?? null,
  };
}

export async function action({ request, params, context }: Route.ActionArgs) {
  await consumeOr429(["tokenClient", clientKey(context)], ["inviteToken", params.token ?? ""]);
  const signedIn = await getUser(request);
  const form = await request.formData();
  try {
    if (form.get("intent") === "join") {
      await acceptInvitation(params.token, { signedIn });
      return redirect("/athlete?joined=1");
    }
    const parsed = parseForm(acceptInviteSchema, form);
    if (!parsed.ok) return data({ fieldErrors: parsed.fieldErrors, values: parsed.values }, { status: 400 });
    const athlete = await acceptInvitation(params.token, { signedIn, newAccount: parsed.data });
    const cookie = await startSession(athlete, request);
    return redirect("/athlete?joined=1", { headers: { "Set-Cookie": cookie } });
  } catch (err) {
    return pageFailure(err, (e) => ({ fieldErrors: { form: e.message }, values: {} }));
  }
}

export default function Invite({ loaderData, actionData, params }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const errors: Record<string, string | undefined> = actionData?.fieldErrors ?? {};
  const values: Record<string, string | undefined> = actionData?.values ?? {};
  if (!loaderData.valid) {
    return (
      <AuthFrame title="This invitation no longer works">
        <FormMessage>{INVITE_DEAD}</FormMessage>
        <p className="mt-4 text-sm text-ink-soft">Ask your coach to send a new one.</p>
      </AuthFrame>
    );
  }
  const { coachName, email, hasAccount, signedInAs, suggestedName } = loaderData;
  return (
    <AuthFrame title={`Train with ${coachName}`} lead={`${coachName} invited ${email} to Pacewright.`}>
      {errors.form && (
        <div className="mb-4">
          <FormMessage>{errors.form}</FormMessage>
        </div>
      )}
      {hasAccount ? (
        signedInAs === email ? (
          <Form method="post">
            <input type="hidden" name="intent" value="join" />
            <button type="submit" className={buttonClass("primary", "w-full py-2.5")} disabled={busy}>
              Join {coachName}'s roster
            </button>
          </Form>
        ) : (
          <div className="flex flex-col gap-3">
            <p className="text-sm">You already have an account. Sign in as {email} to accept.</p>
            <Link to={`/login?redirectTo=${encodeURIComponent(`/invite/${params.token}`)}`} className={buttonClass("primary", "w-full")}>
              Sign in to accept
            </Link>
          </div>
        )
      ) : (
        <Form method="post" className="flex flex-col gap-4" noValidate>
          <Field label="E-mail" name="email-display" value={email} readOnly disabled />
          <Field label="Your name" name="name" autoComplete="name" defaultValue={values.name ?? suggestedName} error={errors.name} required />
          <Field label="Choose a password" name="password" type="password" autoComplete="new-password" hint="At least 10 characters." error={errors.password} required minLength={10} />
          <TimezoneSelect defaultValue={values.timezone} error={errors.timezone} />
          <button type="submit" className={buttonClass("primary", "w-full py-2.5")} disabled={busy}>
            {busy ? "Joining…" : "Accept and create my account"}
          </button>
        </Form>
      )}
    </AuthFrame>
  );
}
