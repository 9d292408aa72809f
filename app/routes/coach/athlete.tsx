import { Link, useFetcher } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { Field, FormMessage, SelectField } from "~/components/ui/field";
import { writeTransaction } from "~/.server/db";
import { requireAthleteSubject } from "~/.server/access";
import { accepted, athleteProfileSchema, fieldProps, parseSubmission, refuse, useSchemaForm } from "~/lib/forms";
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
  const submission = parseSubmission(await request.formData(), athleteProfileSchema);
  if (submission.status !== "success") return refuse(submission);
  const values = submission.value;
  await writeTransaction(async (transaction) => {
    await athlete.update(values, { transaction });
  });
  // The fields keep showing what was saved.
  return accepted(submission, "Saved.", { reset: false });
}

export default function CoachAthlete({ loaderData }: Route.ComponentProps) {
  const { athlete } = loaderData;
  const fetcher = useFetcher<typeof action>();
  const text = (v: number | null) => (v === null ? "" : String(v));
  const [form, fields] = useSchemaForm(athleteProfileSchema, fetcher.data, {
    id: "athlete-profile",
    defaultValue: {
      sex: athlete.sex ?? "",
      weightKg: text(athlete.weightKg),
      restingHr: text(athlete.restingHr),
      maxHr: text(athlete.maxHr),
    },
  });
  const saved = fetcher.data && "message" in fetcher.data ? fetcher.data.message : undefined;
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
        <fetcher.Form
          method="post"
          id={form.id}
          onSubmit={form.onSubmit}
          className="mt-4 grid gap-4 sm:grid-cols-2"
          noValidate
        >
          {saved && (
            <div className="sm:col-span-2">
              <FormMessage tone="ok">{saved}</FormMessage>
            </div>
          )}
          <SelectField key={fields.sex.key} label="Sex (for heart-rate load)" {...fieldProps(fields.sex)}>
            <option value="">Not given</option>
            <option value="female">Female</option>
            <option value="male">Male</option>
          </SelectField>
          <Field key={fields.weightKg.key} label="Weight (kg)" inputMode="decimal" {...fieldProps(fields.weightKg)} />
          <Field
            key={fields.restingHr.key}
            label="Resting heart rate (bpm)"
            inputMode="numeric"
            {...fieldProps(fields.restingHr)}
          />
          <Field
            key={fields.maxHr.key}
            label="Maximum heart rate (bpm)"
            inputMode="numeric"
            {...fieldProps(fields.maxHr)}
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
