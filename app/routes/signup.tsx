import { data, Form, Link, redirect, useNavigation, useSearchParams } from "react-router";
import { AuthFrame } from "~/components/auth-frame";
import { Field, FormMessage } from "~/components/ui/field";
import { buttonClass } from "~/components/ui/button";
import { TimezoneSelect } from "~/components/timezone-select";
import { getUser, homeFor, startSession } from "~/.server/auth";
import { safeRedirect } from "~/.server/http";
import { clientKey, consumeOr429 } from "~/.server/security/rate-limits";
import { pageFailure } from "~/.server/replies";
import { signUp } from "~/.server/services/accounts";
import { parseForm, signUpSchema } from "~/lib/forms";
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
  const parsed = parseForm(signUpSchema, form);
  if (!parsed.ok) return data({ fieldErrors: parsed.fieldErrors, values: parsed.values }, { status: 400 });
  // Counted before the password is hashed: sign-up is also a way to ask whether an address has an account.
  await consumeOr429(["signUpClient", clientKey(context)], ["signUpAddress", parsed.data.email]);
  try {
    const user = await signUp(parsed.data);
    const cookie = await startSession(user, request);
    return redirect(safeRedirect(form.get("redirectTo"), homeFor(user.role)), { headers: { "Set-Cookie": cookie } });
  } catch (err) {
    const { password: _omit, ...values } = parsed.data;
    return pageFailure(err, (e) => ({ fieldErrors: { [e.field ?? "form"]: e.message }, values }));
  }
}

export default function SignUp({ actionData }: Route.ComponentProps) {
  const errors: Record<string, string | undefined> = actionData?.fieldErrors ?? {};
  const values: Record<string, string | undefined> = actionData?.values ?? {};
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
          Already have an account? <Link to="/login" className="text-teal underline">Sign in</Link>
        </>
      }
    >
      <Form method="post" className="flex flex-col gap-4" noValidate>
        {errors.form && <FormMessage>{errors.form}</FormMessage>}
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
                  <input type="radio" name="role" value={value} defaultChecked={(values.role ?? (buying ? "athlete" : "coach")) === value} />
                  {label}
                </span>
                <span className="mt-1 text-xs text-ink-soft">{hint}</span>
              </label>
            ))}
          </div>
          {errors.role && <p className="text-sm text-brick">{errors.role}</p>}
        </fieldset>
        <Field label="Name" name="name" autoComplete="name" defaultValue={values.name} error={errors.name} required />
        <Field label="E-mail" name="email" type="email" autoComplete="email" defaultValue={values.email} error={errors.email} required />
        <Field
          label="Password"
          name="password"
          type="password"
          autoComplete="new-password"
          hint="At least 10 characters."
          error={errors.password}
          required
          minLength={10}
        />
        <TimezoneSelect defaultValue={values.timezone} error={errors.timezone} />
        <button type="submit" className={buttonClass("primary", "mt-2 w-full py-2.5")} disabled={busy}>
          {busy ? "Creating…" : "Create account"}
        </button>
      </Form>
    </AuthFrame>
  );
}

