import { Form, Link, redirect, useNavigation, useSearchParams } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { Field, FormMessage } from "~/components/ui/field";
import { buttonClass } from "~/components/ui/button";
import { TimezoneSelect } from "~/components/timezone-select";
import { getUser, homeFor, startSignIn } from "~/.server/auth";
import { safeRedirect } from "~/.server/http";
import { clientKey, consumeOr429 } from "~/.server/security/rate-limits";
import { formFailure } from "~/.server/replies";
import { signUp } from "~/.server/services/sign-up";
import { fieldProps, parseSubmission, refuse, signUpSchema, useSchemaForm } from "~/lib/forms";
import type { Route } from "./+types/signup";

export const meta: Route.MetaFunction = () => [{ title: "Create an account · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await getUser(request);
  if (user) throw redirect(homeFor(user.role));
  return null;
}

export async function action({ request, context }: Route.ActionArgs) {
  const signedIn = await getUser(request);
  if (signedIn) throw redirect(homeFor(signedIn.role));
  const form = await request.formData();
  const submission = parseSubmission(form, signUpSchema);
  if (submission.status !== "success") return refuse(submission);
  // Counted before the password is hashed: sign-up is also a way to ask whether an address has an account.
  await consumeOr429(["signUpClient", clientKey(context)], ["signUpAddress", submission.value.email]);
  try {
    const user = await signUp(submission.value);
    const cookie = await startSignIn(user, request);
    return redirect(safeRedirect(form.get("redirectTo"), homeFor(user.role)), { headers: { "Set-Cookie": cookie } });
  } catch (err) {
    return formFailure(err, submission);
  }
}

export default function SignUp({ actionData }: Route.ComponentProps) {
  const [form, fields] = useSchemaForm(signUpSchema, actionData);
  const busy = useNavigation().state === "submitting";
  const [params] = useSearchParams();
  const redirectTo = params.get("redirectTo") ?? "";
  const buying = redirectTo.startsWith("/shop/");
  return (
    <AuthFrame
      title="Create your account"
      lead="Coaches build season plans and run field tests; athletes follow them with their own targets."
      footer={
        <>
          Already have an account?{" "}
          <Link to="/login" className="text-teal underline">
            Sign in
          </Link>
        </>
      }
    >
      <Form method="post" id={form.id} onSubmit={form.onSubmit} className="flex flex-col gap-4" noValidate>
        {form.errors?.[0] && <FormMessage>{form.errors[0]}</FormMessage>}
        <input type="hidden" name="redirectTo" value={redirectTo} />
        <fieldset className="flex flex-col gap-2">
          <legend className="text-sm font-medium">I am</legend>
          <div className="grid grid-cols-2 gap-2">
            {(
              [
                ["coach", "a coach", "I plan and test for athletes"],
                ["athlete", "an athlete", "I train and log my sessions"],
              ] as const
            ).map(([value, label, hint]) => (
              <label
                key={value}
                className="flex cursor-pointer flex-col rounded-lg border border-line p-3 has-[:checked]:border-teal has-[:checked]:bg-teal/5"
              >
                <span className="flex items-center gap-2 font-medium">
                  <input
                    type="radio"
                    name={fields.role.name}
                    value={value}
                    defaultChecked={(fields.role.initialValue ?? (buying ? "athlete" : "coach")) === value}
                  />
                  {label}
                </span>
                <span className="mt-1 text-xs text-ink-soft">{hint}</span>
              </label>
            ))}
          </div>
          {fields.role.errors?.[0] && <p className="text-sm text-brick">{fields.role.errors[0]}</p>}
        </fieldset>
        <Field label="Name" autoComplete="name" required {...fieldProps(fields.name)} />
        <Field label="E-mail" type="email" autoComplete="email" required {...fieldProps(fields.email)} />
        <Field
          label="Password"
          type="password"
          autoComplete="new-password"
          hint="At least 10 characters."
          {...fieldProps(fields.password)}
          required
          minLength={10}
        />
        <TimezoneSelect defaultValue={fieldProps(fields.timezone).defaultValue} error={fields.timezone.errors?.[0]} />
        <button type="submit" className={buttonClass("primary", "mt-2 w-full py-2.5")} disabled={busy}>
          {busy ? "Creating…" : "Create account"}
        </button>
      </Form>
    </AuthFrame>
  );
}
