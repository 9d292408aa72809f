import { data, redirect, useFetcher } from "react-router";
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
import { pageFailure } from "~/.server/replies";
import { formatDateTime } from "~/lib/format";
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

type Result = { ok: boolean; message: string; recoveryCodes?: string[] };
const fail = (message: string, status = 400) => data<Result>({ ok: false, message }, { status });

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await request.formData();
  const intent = String(form.get("intent") ?? "");
  const code = String(form.get("code") ?? "");
  try {
    switch (intent) {
      case "sign-out-device": {
        const handle = String(form.get("handle") ?? "");
        const devices = await listDevices(user, await currentSignInKey(request));
        const device = devices.find((d) => d.handle === handle);
        if (!device) notFound("That device is not signed in to your account.");
        if (device.current) {
          // Signing this device out is the ordinary sign-out.
          throw redirect("/login", { headers: { "Set-Cookie": await endSignIn(request) } });
        }
        await signOutDevice(user, handle);
        return data<Result>({ ok: true, message: `${device.label} is signed out.` });
      }
      case "sign-out-others": {
        const n = await signOutEverywhereElse(user, await currentSignInKey(request));
        return data<Result>({
          ok: true,
          message:
            n === 0 ? "No other device was signed in." : `Signed out ${n} other ${n === 1 ? "device" : "devices"}.`,
        });
      }
      case "two-step-start":
        await startEnrolment(user);
        return data<Result>({
          ok: true,
          message: "Scan the code with your authenticator app, then enter the code it shows.",
        });
      case "two-step-confirm": {
        const recoveryCodes = await confirmEnrolment(user, code);
        return data<Result>({ ok: true, message: "Two-step sign-in is on.", recoveryCodes });
      }
      case "two-step-disable":
        await disableTwoStep(user, code);
        return data<Result>({ ok: true, message: "Two-step sign-in is off." });
      case "studio-require": {
        if (user.role !== "admin") forbidden("Only admins change studio settings.");
        const required = form.get("required") === "on";
        await setTwoStepRequiredForStaff(required);
        return data<Result>({
          ok: true,
          message: required ? "Coaches and admins must now use two-step sign-in." : "Two-step sign-in is now optional.",
        });
      }
      default:
        return fail("Unknown action.");
    }
  } catch (err) {
    return pageFailure(err, (e): Result => ({ ok: false, message: e.message }));
  }
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
          {devicesFetcher.data && (
            <div className="mt-3">
              <FormMessage tone={devicesFetcher.data.ok ? "ok" : "error"}>{devicesFetcher.data.message}</FormMessage>
            </div>
          )}
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
                    <input type="hidden" name="handle" value={d.handle} />
                    <button name="intent" value="sign-out-device" className={buttonClass("ghost", "text-brick")}>
                      Sign out
                    </button>
                  </devicesFetcher.Form>
                )}
              </li>
            ))}
          </ul>
          <devicesFetcher.Form method="post" className="mt-3">
            <button name="intent" value="sign-out-others" className={buttonClass("secondary")} disabled={others === 0}>
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

function TwoStepCard({ twoStep }: { twoStep: NonNullable<Route.ComponentProps["loaderData"]["twoStep"]> }) {
  const fetcher = useFetcher<typeof action>();
  const codes = fetcher.data?.recoveryCodes;
  return (
    <Card>
      <h2 className="text-lg font-semibold">Two-step sign-in</h2>
      <p className="mt-1 text-sm text-ink-soft">
        After your password, a six-digit code from an authenticator app on your phone. Someone who learns your password
        still cannot sign in.
      </p>
      {fetcher.data && !codes && (
        <div className="mt-3">
          <FormMessage tone={fetcher.data.ok ? "ok" : "error"}>{fetcher.data.message}</FormMessage>
        </div>
      )}
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
        <fetcher.Form method="post" className="mt-4 flex flex-col gap-3">
          <p className="text-sm">
            On. {twoStep.codesLeft} recovery {twoStep.codesLeft === 1 ? "code" : "codes"} left.
          </p>
          {!twoStep.required && (
            <>
              <Field label="Code from your app (to turn it off)" name="code" autoComplete="one-time-code" required />
              <button name="intent" value="two-step-disable" className={buttonClass("ghost", "self-start text-brick")}>
                Turn two-step sign-in off
              </button>
            </>
          )}
        </fetcher.Form>
      ) : twoStep.enrolment ? (
        <fetcher.Form method="post" className="mt-4 flex flex-col gap-3">
          <div
            className="w-48 rounded-lg bg-white p-2"
            role="img"
            aria-label="QR code to add Pacewright to your authenticator app"
            dangerouslySetInnerHTML={{ __html: twoStep.enrolment.qrSvg }}
          />
          <p className="text-xs text-ink-soft">
            Cannot scan? Enter this key in the app:{" "}
            <span className="num font-mono break-all" data-testid="totp-secret">
              {twoStep.enrolment.secret}
            </span>
          </p>
          <Field label="Code the app shows" name="code" inputMode="numeric" autoComplete="one-time-code" required />
          <button name="intent" value="two-step-confirm" className={buttonClass("primary", "self-start")}>
            Turn on
          </button>
        </fetcher.Form>
      ) : (
        <fetcher.Form method="post" className="mt-4">
          <button name="intent" value="two-step-start" className={buttonClass("primary")}>
            Set up two-step sign-in
          </button>
        </fetcher.Form>
      )}
    </Card>
  );
}

function StudioCard({ required }: { required: boolean }) {
  const fetcher = useFetcher<typeof action>();
  return (
    <Card>
      <h2 className="text-lg font-semibold">Studio setting</h2>
      <fetcher.Form method="post" className="mt-3 flex flex-col gap-3 text-sm">
        <input type="hidden" name="intent" value="studio-require" />
        <label className="flex items-center gap-2">
          <input type="checkbox" name="required" defaultChecked={required} />
          Require two-step sign-in for every coach and admin
        </label>
        <button className={buttonClass("secondary", "self-start")}>Save</button>
        {fetcher.data && <FormMessage tone={fetcher.data.ok ? "ok" : "error"}>{fetcher.data.message}</FormMessage>}
      </fetcher.Form>
    </Card>
  );
}
