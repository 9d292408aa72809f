import { data, Link, useFetcher } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { Field, FormMessage, SelectField } from "~/components/ui/field";
import { writeTransaction } from "~/.server/db";
import { requireAthleteSubject } from "~/.server/access";
import { athleteProfileSchema, parseForm } from "~/lib/forms";
import type { Route } from "./+types/athlete";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.athlete.name ?? "Athlete"} · Pacewright` }];

async function requireOwnAthlete(request: Request, athleteIdParam: string) {
  const { viewer: coach, athlete } = await requireAthleteSubject(request, athleteIdParam);
  return { coach, athlete };
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { athlete } = await requireOwnAthlete(request, params.athleteId);
  return {
    athlete: {
      id: athlete.id,
      name: athlete.name,
      email: athlete.email,
      timezone: athlete.timezone,
      sex: athlete.sex,
      weightKg: athlete.weightKg,
      restingHr: athlete.restingHr,
      maxHr: athlete.maxHr,
    },
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { athlete } = await requireOwnAthlete(request, params.athleteId);
  const parsed = parseForm(athleteProfileSchema, await request.formData());
  if (!parsed.ok) return data({ ok: false as const, fieldErrors: parsed.fieldErrors }, { status: 400 });
  await writeTransaction(async (transaction) => {
    await athlete.update(parsed.data, { transaction });
  });
  return { ok: true as const, fieldErrors: {} };
}

export default function CoachAthlete({ loaderData }: Route.ComponentProps) {
  const { athlete } = loaderData;
  const fetcher = useFetcher<typeof action>();
  const errors: Record<string, string | undefined> = fetcher.data?.fieldErrors ?? {};
  return (
    <>
      <p className="mb-2 text-sm">
        <Link to="/coach" className="text-teal underline">
          Roster
        </Link>{" "}
        / {athlete.name}
      </p>
      <PageHeader
        title={athlete.name}
        lead={`${athlete.email} · ${athlete.timezone.replaceAll("_", " ")}`}
        actions={
          <>
            <Link to={`/coach/athletes/${athlete.id}/calendar`} className={buttonClass("secondary")}>
              Calendar
            </Link>
            <Link to={`/coach/athletes/${athlete.id}/tests`} className={buttonClass("secondary")}>
              Field tests
            </Link>
            <Link to={`/coach/athletes/${athlete.id}/load`} className={buttonClass("secondary")}>
              Load
            </Link>
          </>
        }
      />
      <Card className="max-w-xl">
        <h2 className="font-semibold">Body and heart rate</h2>
        <p className="mt-1 text-sm text-ink-soft">
          Used for heart-rate load and watts per kilogram. Leave a field empty if unknown.
        </p>
        <fetcher.Form method="post" className="mt-4 grid gap-4 sm:grid-cols-2" noValidate>
          {fetcher.data?.ok && (
            <div className="sm:col-span-2">
              <FormMessage tone="ok">Saved.</FormMessage>
            </div>
          )}
          <SelectField label="Sex (for heart-rate load)" name="sex" defaultValue={athlete.sex ?? ""} error={errors.sex}>
            <option value="">Not given</option>
            <option value="female">Female</option>
            <option value="male">Male</option>
          </SelectField>
          <Field
            label="Weight (kg)"
            name="weightKg"
            inputMode="decimal"
            defaultValue={athlete.weightKg ?? ""}
            error={errors.weightKg}
          />
          <Field
            label="Resting heart rate (bpm)"
            name="restingHr"
            inputMode="numeric"
            defaultValue={athlete.restingHr ?? ""}
            error={errors.restingHr}
          />
          <Field
            label="Maximum heart rate (bpm)"
            name="maxHr"
            inputMode="numeric"
            defaultValue={athlete.maxHr ?? ""}
            error={errors.maxHr}
          />
          <div className="sm:col-span-2">
            <button type="submit" className={buttonClass("primary")} disabled={fetcher.state !== "idle"}>
              {fetcher.state !== "idle" ? "Saving…" : "Save"}
            </button>
          </div>
        </fetcher.Form>
      </Card>
    </>
  );
}
