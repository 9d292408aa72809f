import { redirect, useFetcher } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { Field, FormMessage } from "~/components/ui/field";
import { currentSignInKey, endSignIn, requireUser } from "~/.server/auth";
import { listDevices, signOutDevice, signOutEverywhereElse } from "~/.server/services/devices";
import {
  confirmEnrolment,
  disableTwoStep,
  enrolmentView,
  mustEnrol,
  recoveryCodesLeft,
  setTwoStepRequiredForStaff,
  startEnrolment,
  twoStepOn,
  twoStepRequiredForStaff,
} from "~/.server/services/two-step";
import { forbidden, notFound } from "~/.server/http";
import { formFailure, submitForm } from "~/.server/replies";
import { formatDateTime } from "~/lib/format";
import {
  accepted,
  fieldProps,
  type FormAnswer,
  jsonRefusal,
  messageOf,
  parseSubmission,
  refuse,
  useSchemaForm,
} from "~/lib/forms";
import {
  confirmTwoStepSchema,
  disableTwoStepSchema,
  NOTHING_CHANGED,
  signOutDeviceSchema,
  signOutOthersSchema,
  startTwoStepSchema,
  studioTwoStepSchema,
} from "~/lib/security-forms";
import type { Route } from "./+types/security";

export const meta: Route.MetaFunction = () => [{ title: "Sign-in and devices · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await requireUser(request);
  const staff = user.role === "coach" || user.role === "admin";
  return {
    timezone: user.timezone,
    devices: await listDevices(user, await currentSignInKey(request)),
    twoStep: staff
      ? {
          on: twoStepOn(user),
          codesLeft: twoStepOn(user) ? await recoveryCodesLeft(user) : 0,
          enrolment: await enrolmentView(user),
          required: await twoStepRequiredForStaff(),
          mustEnrol: await mustEnrol(user),
        }
      : null,
    isAdmin: user.role === "admin",
  };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  const intent = form.get("intent");
  if (intent === "sign-out-device")
    return submitForm(form, signOutDeviceSchema, "Choose a device to sign out.", async ({ handle }) => {
      const devices = await listDevices(user, await currentSignInKey(request));
      const device = devices.find((d) => d.handle === handle);
      if (!device) notFound("That device is not signed in to your account.");
      if (device.current) {
        // Signing this device out is the ordinary sign-out.
        throw redirect("/login", { headers: { "Set-Cookie": await endSignIn(request) } });
      }
      await signOutDevice(user, handle);
      return `${device.label} is signed out.`;
    });
  if (intent === "sign-out-others")
    return submitForm(form, signOutOthersSchema, NOTHING_CHANGED, async () => {
      const n = await signOutEverywhereElse(user, await currentSignInKey(request));
      return n === 0 ? "No other device was signed in." : `Signed out ${n} other ${n === 1 ? "device" : "devices"}.`;
    });
  if (intent === "two-step-start")
    return submitForm(form, startTwoStepSchema, NOTHING_CHANGED, async () => {
      await startEnrolment(user);
      return "Scan the code with your authenticator app, then enter the code it shows.";
    });
  if (intent === "two-step-confirm") {
    // Not through submitForm: besides its sentence this reply carries the recovery codes, which exist only here
    // (the database keeps their hashes) and so are shown from this one reply, never from the loader.
    const submission = parseSubmission(form, confirmTwoStepSchema);
    if (submission.status !== "success") return refuse(submission, { form: NOTHING_CHANGED });
    try {
      const recoveryCodes = await confirmEnrolment(user, submission.value.code);
      return { ...accepted(submission, "Two-step sign-in is on."), recoveryCodes };
    } catch (err) {
      return formFailure(err, submission, { field: "code" });
    }
  }
  if (intent === "two-step-disable")
    return submitForm(
      form,
      disableTwoStepSchema,
      NOTHING_CHANGED,
      async ({ code }) => {
        await disableTwoStep(user, code);
        return "Two-step sign-in is off.";
      },
      { field: "code" },
    );
  if (intent === "studio-require") {
    if (user.role !== "admin") forbidden("Only admins change studio settings.");
    return submitForm(form, studioTwoStepSchema, NOTHING_CHANGED, async ({ required }) => {
      await setTwoStepRequiredForStaff(required);
      return required ? "Coaches and admins must now use two-step sign-in." : "Two-step sign-in is now optional.";
    });
  }
  return jsonRefusal("Unknown action.");
}

/** What a reply says above its form: the sentence of a change made, or the form's own refusal. */
function ReplyNote({ reply }: { reply: FormAnswer | undefined }) {
  const refused = messageOf(reply);
  const saved = reply?.message;
  if (!refused && !saved) return null;
  return (
    <div className="mt-3">
      <FormMessage tone={refused ? "error" : "ok"}>{refused ?? saved}</FormMessage>
    </div>
  );
}

export default function Security({ loaderData }: Route.ComponentProps) {
  const { devices, twoStep, isAdmin, timezone } = loaderData;
  const devicesFetcher = useFetcher<typeof action>();
  const others = devices.filter((d) => !d.current).length;
  return (
    <>
      <PageHeader title="Sign-in and devices" lead="Where your account is signed in, and how you sign in." />
      {twoStep?.mustEnrol && (
        <FormMessage>
          Your studio requires two-step sign-in for coaches and admins. Set it up below to go on.
        </FormMessage>
      )}
      <div className="mt-4 grid gap-6 lg:grid-cols-2">
        <Card>
          <h2 className="text-lg font-semibold">Signed-in devices</h2>
          <ReplyNote reply={devicesFetcher.data} />
          <ul className="mt-3 divide-y divide-line" data-testid="devices">
            {devices.map((d) => (
              <li key={d.handle} className="flex flex-wrap items-center justify-between gap-2 py-3 text-sm">
                <div>
                  <p className="font-medium">
                    {d.label}{" "}
                    {d.current && (
                      <span className="ml-1 rounded bg-teal px-1.5 py-0.5 text-xs text-paper">this device</span>
                    )}
                  </p>
                  <p className="text-ink-soft">
                    Signed in {formatDateTime(d.signedInAt, timezone)} · last active{" "}
                    {formatDateTime(d.lastSeenAt, timezone)}
                  </p>
                </div>
                {!d.current && (
                  <devicesFetcher.Form method="post">
                    <input type="hidden" name="intent" value="sign-out-device" />
                    <input type="hidden" name="handle" value={d.handle} />
                    <button className={buttonClass("ghost", "text-brick")}>Sign out</button>
                  </devicesFetcher.Form>
                )}
              </li>
            ))}
          </ul>
          <devicesFetcher.Form method="post" className="mt-3">
            <input type="hidden" name="intent" value="sign-out-others" />
            <button className={buttonClass("secondary")} disabled={others === 0}>
              Sign out everywhere else
            </button>
          </devicesFetcher.Form>
        </Card>
        {twoStep && <TwoStepCard twoStep={twoStep} />}
        {isAdmin && twoStep && <StudioCard required={twoStep.required} />}
      </div>
    </>
  );
}

type TwoStep = NonNullable<Route.ComponentProps["loaderData"]["twoStep"]>;

/**
 * One fetcher for the card: after "Turn on" the loader answers `on`, the enrolment form gives way to the one that
 * turns it off, and the recovery codes in this fetcher's reply must outlive that switch. A fetcher inside the
 * enrolment form would go with it, and the codes (never in a loader) with the fetcher.
 */
function TwoStepCard({ twoStep }: { twoStep: TwoStep }) {
  const fetcher = useFetcher<typeof action>();
  const reply = fetcher.data;
  const codes = reply && "recoveryCodes" in reply ? reply.recoveryCodes : undefined;
  return (
    <Card>
      <h2 className="text-lg font-semibold">Two-step sign-in</h2>
      <p className="mt-1 text-sm text-ink-soft">
        After your password, a six-digit code from an authenticator app on your phone. Someone who learns your password
        still cannot sign in.
      </p>
      {!codes && <ReplyNote reply={reply} />}
      {codes && (
        <div className="mt-3 rounded-lg border border-teal p-4 text-sm" data-testid="recovery-codes">
          <p className="font-medium">
            Two-step sign-in is on. Keep these recovery codes somewhere safe: each signs you in once if you lose your
            phone. They are shown only now.
          </p>
          <ul className="num mt-2 grid grid-cols-2 gap-1 font-mono">
            {codes.map((c) => (
              <li key={c}>{c}</li>
            ))}
          </ul>
        </div>
      )}
      {twoStep.on ? (
        <DisableForm twoStep={twoStep} fetcher={fetcher} />
      ) : twoStep.enrolment ? (
        <ConfirmForm enrolment={twoStep.enrolment} fetcher={fetcher} />
      ) : (
        <fetcher.Form method="post" className="mt-4">
          <input type="hidden" name="intent" value="two-step-start" />
          <button className={buttonClass("primary")}>Set up two-step sign-in</button>
        </fetcher.Form>
      )}
    </Card>
  );
}

type CardFetcher = ReturnType<typeof useFetcher<typeof action>>;

function ConfirmForm({ enrolment, fetcher }: { enrolment: NonNullable<TwoStep["enrolment"]>; fetcher: CardFetcher }) {
  const [form, fields] = useSchemaForm(confirmTwoStepSchema, fetcher.data, { id: "two-step-confirm" });
  return (
    <fetcher.Form method="post" id={form.id} onSubmit={form.onSubmit} noValidate className="mt-4 flex flex-col gap-3">
      <input type="hidden" name="intent" value="two-step-confirm" />
      <div
        className="w-48 rounded-lg bg-white p-2"
        role="img"
        aria-label="QR code to add Pacewright to your authenticator app"
        dangerouslySetInnerHTML={{ __html: enrolment.qrSvg }}
      />
      <p className="text-xs text-ink-soft">
        Cannot scan? Enter this key in the app:{" "}
        <span className="num font-mono break-all" data-testid="totp-secret">
          {enrolment.secret}
        </span>
      </p>
      <Field
        label="Code the app shows"
        {...fieldProps(fields.code)}
        inputMode="numeric"
        autoComplete="one-time-code"
        required
      />
      <button className={buttonClass("primary", "self-start")} disabled={fetcher.state !== "idle"}>
        Turn on
      </button>
    </fetcher.Form>
  );
}

function DisableForm({ twoStep, fetcher }: { twoStep: TwoStep; fetcher: CardFetcher }) {
  const [form, fields] = useSchemaForm(disableTwoStepSchema, fetcher.data, { id: "two-step-disable" });
  return (
    <fetcher.Form method="post" id={form.id} onSubmit={form.onSubmit} noValidate className="mt-4 flex flex-col gap-3">
      <input type="hidden" name="intent" value="two-step-disable" />
      <p className="text-sm">
        On. {twoStep.codesLeft} recovery {twoStep.codesLeft === 1 ? "code" : "codes"} left.
      </p>
      {!twoStep.required && (
        <>
          <Field
            label="Code from your app (to turn it off)"
            {...fieldProps(fields.code)}
            autoComplete="one-time-code"
            required
          />
          <button className={buttonClass("ghost", "self-start text-brick")} disabled={fetcher.state !== "idle"}>
            Turn two-step sign-in off
          </button>
        </>
      )}
    </fetcher.Form>
  );
}

function StudioCard({ required }: { required: boolean }) {
  const fetcher = useFetcher<typeof action>();
  const [form, fields] = useSchemaForm(studioTwoStepSchema, fetcher.data, { id: "studio-two-step" });
  return (
    <Card>
      <h2 className="text-lg font-semibold">Studio setting</h2>
      <fetcher.Form
        method="post"
        id={form.id}
        onSubmit={form.onSubmit}
        noValidate
        className="mt-3 flex flex-col gap-3 text-sm"
      >
        <input type="hidden" name="intent" value="studio-require" />
        <label className="flex items-center gap-2">
          <input type="checkbox" name={fields.required.name} defaultChecked={required} />
          Require two-step sign-in for every coach and admin
        </label>
        <button className={buttonClass("secondary", "self-start")}>Save</button>
        <ReplyNote reply={fetcher.data} />
      </fetcher.Form>
    </Card>
  );
}
