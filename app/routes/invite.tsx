import { Form, Link, useNavigation } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { TimezoneSelect } from "~/components/timezone-select";
import { buttonClass } from "~/components/ui/button";
import { Field, FormMessage } from "~/components/ui/field";
import { getUser, startSignIn } from "~/.server/auth";
import { formFailure } from "~/.server/replies";
import { acceptInvitation, findInvitation } from "~/.server/services/invitations";
import { INVITE_DEAD } from "~/lib/messages";
import { acceptInviteSchema, fieldProps, parseSubmission, refuse, useSchemaForm } from "~/lib/forms";
import { redirectWithToast } from "~/.server/flash";
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

const JOINED = "You joined your coach's roster. Your plan will show up here.";

export async function action({ request, params, context }: Route.ActionArgs) {
  await consumeOr429(["tokenClient", clientKey(context)], ["inviteToken", params.token ?? ""]);
  const signedIn = await getUser(request);
  const form = await request.formData();
  // Joining with the account already signed in sends no fields: the schema is the new-account form's.
  const submission = parseSubmission(form, acceptInviteSchema);
  try {
    if (form.get("intent") === "join") {
      await acceptInvitation(params.token, { signedIn });
      return redirectWithToast(request, "/athlete", JOINED);
    }
    if (submission.status !== "success") return refuse(submission);
    const athlete = await acceptInvitation(params.token, { signedIn, newAccount: submission.value });
    return redirectWithToast(request, "/athlete", JOINED, "ok", {
      headers: { "Set-Cookie": await startSignIn(athlete, request) },
    });
  } catch (err) {
    return formFailure(err, submission);
  }
}

export default function Invite({ loaderData, actionData, params }: Route.ComponentProps) {
  const busy = useNavigation().state === "submitting";
  const [form, fields] = useSchemaForm(acceptInviteSchema, actionData);
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
      {form.errors?.[0] && (
        <div className="mb-4">
          <FormMessage>{form.errors[0]}</FormMessage>
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
            <Link
              to={`/login?redirectTo=${encodeURIComponent(`/invite/${params.token}`)}`}
              className={buttonClass("primary", "w-full")}
            >
              Sign in to accept
            </Link>
          </div>
        )
      ) : (
        <Form method="post" id={form.id} onSubmit={form.onSubmit} className="flex flex-col gap-4" noValidate>
          <Field label="E-mail" name="email-display" value={email} readOnly disabled />
          <Field
            label="Your name"
            autoComplete="name"
            required
            {...fieldProps(fields.name)}
            defaultValue={fieldProps(fields.name).defaultValue ?? suggestedName}
          />
          <Field
            label="Choose a password"
            type="password"
            autoComplete="new-password"
            hint="At least 10 characters."
            required
            minLength={10}
            {...fieldProps(fields.password)}
          />
          <TimezoneSelect defaultValue={fieldProps(fields.timezone).defaultValue} error={fields.timezone.errors?.[0]} />
          <button type="submit" className={buttonClass("primary", "w-full py-2.5")} disabled={busy}>
            {busy ? "Joining…" : "Accept and create my account"}
          </button>
        </Form>
      )}
    </AuthFrame>
  );
}
