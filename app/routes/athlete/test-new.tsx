import { useEffect, useState } from "react";
import { Link, useFetcher } from "react-router";
import { FILE_PROTOCOLS, FileResult } from "~/components/field-test/file-result";
import { GuardCard, ProposalCard, type TestPreview } from "~/components/field-test/proposal";
import {
  CriticalPowerInputs,
  FIRST_EFFORTS,
  TYPED_INPUTS,
  typedInputs,
  type TypedFields,
} from "~/components/field-test/protocol-inputs";
import { ReadinessCard, type Answer } from "~/components/field-test/readiness";
import type { UploadResult } from "~/components/upload-box";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireAthleteSubject } from "~/.server/access";
import { requireJson } from "~/.server/http";
import { todayIn } from "~/lib/dates";
import { firstMessage } from "~/lib/forms";
import { PROTOCOLS, PROTOCOL_KEYS, READINESS, type ProtocolKey } from "~/lib/protocols";
import { saveFromRequest } from "./test-new.server";
import type { Route } from "./+types/test-new";

export const meta: Route.MetaFunction = () => [{ title: "New field test · Pacewright" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { athlete, base, viewer } = await requireAthleteSubject(request, params.athleteId);
  return {
    athlete: { id: athlete.id, name: athlete.name },
    base,
    forCoach: viewer.id !== athlete.id,
    today: todayIn(athlete.timezone),
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { athlete, viewer, base } = await requireAthleteSubject(request, params.athleteId);
  requireJson(request);
  return saveFromRequest(request, athlete, viewer, base);
}

export default function NewTest({ loaderData }: Route.ComponentProps) {
  const { athlete, base, forCoach, today } = loaderData;
  const [protocol, setProtocol] = useState<ProtocolKey>("twenty_minute");
  const [testedOn, setTestedOn] = useState(today);
  const [source, setSource] = useState<"typed" | "file">("typed");
  const [fields, setFields] = useState<TypedFields>({});
  const [efforts, setEfforts] = useState(FIRST_EFFORTS);
  const [upload, setUpload] = useState<UploadResult | null>(null);
  const [windowStart, setWindowStart] = useState<number | null>(null);
  const [answers, setAnswers] = useState<Answer[]>(READINESS.questions.map(() => null));
  const [stopRead, setStopRead] = useState(false);
  const [requestKey] = useState(() =>
    typeof crypto !== "undefined" && "randomUUID" in crypto ? crypto.randomUUID() : String(Math.random()),
  );
  // A fresh fetcher per file: a new upload starts with no proposal, whatever the last file gave.
  const [fileRound, setFileRound] = useState(0);
  const previewer = useFetcher<TestPreview & { error?: string }>({ key: `test-preview-${fileRound}` });
  const [previewedFor, setPreviewedFor] = useState<string | null>(null);
  const [confirmed, setConfirmed] = useState(false);
  const saver = useFetcher<typeof action>();
  const p = PROTOCOLS[protocol];
  const athleteQuery = forCoach ? `?athleteId=${athlete.id}` : "";

  // Only some protocols can be read from a file; choosing another one goes back to typed values.
  if (source === "file" && !FILE_PROTOCOLS.includes(protocol)) setSource("typed");

  const submission = {
    protocol,
    testedOn,
    ...(source === "file" && upload
      ? { uploadId: upload.upload.id, windowStartS: windowStart }
      : { inputs: typedInputs(protocol, fields, efforts) }),
  };
  const submissionKey = JSON.stringify(submission);
  const askPreview = () => {
    setPreviewedFor(submissionKey);
    previewer.submit(submission, {
      method: "post",
      action: `/api/tests/preview${athleteQuery}`,
      encType: "application/json",
    });
  };
  // A file's proposal follows the file and the window chosen in it, without a button (typed values use the button).
  useEffect(() => {
    // eslint-disable-next-line react-hooks/set-state-in-effect -- asks the server for a proposal; the state only records for which form it was asked
    if (source === "file" && upload) askPreview();
  }, [upload, windowStart, protocol, testedOn, source]); // eslint-disable-line react-hooks/exhaustive-deps -- askPreview is rebuilt each render; these are its inputs
  // A confirmation is for the change the person saw; any edit asks for it again.
  const [confirmedFor, setConfirmedFor] = useState(submissionKey);
  if (confirmedFor !== submissionKey) {
    setConfirmedFor(submissionKey);
    setConfirmed(false);
  }

  // A proposal counts only for exactly what is on the form now (a typed value edited after preview is not previewed).
  const preview = previewer.data && !previewer.data.error && previewedFor === submissionKey ? previewer.data : null;
  const needsConfirm = Boolean(preview?.guard.flagged);
  const resetFile = () => {
    setUpload(null);
    setWindowStart(null);
    setPreviewedFor(null);
    setFileRound((n) => n + 1);
  };
  const save = () =>
    saver.submit(
      {
        ...submission,
        requestKey,
        confirmed: needsConfirm ? confirmed : null,
        readiness: p.maximal ? { answers, stopSignsRead: stopRead } : null,
      },
      { method: "post", encType: "application/json" },
    );
  const saveError = firstMessage(saver.data);
  const Typed = protocol === "critical_power" ? null : TYPED_INPUTS[protocol];

  return (
    <>
      <p className="mb-2 text-sm">
        <Link to={`${base}/tests`} className="text-teal underline">
          Field tests
        </Link>{" "}
        / New
      </p>
      <PageHeader
        title={forCoach ? `New field test for ${athlete.name}` : "New field test"}
        lead="Log a result; Pacewright proposes the new threshold, shows what will change, and rescales every future target when you save."
      />
      <div className="grid gap-6 lg:grid-cols-[1fr_24rem]">
        <div className="flex flex-col gap-6">
          <Card>
            <div className="grid gap-4 sm:grid-cols-2">
              <label className="flex flex-col gap-1 text-sm">
                <span className="font-medium">Test</span>
                <select
                  aria-label="Test"
                  value={protocol}
                  onChange={(e) => setProtocol(e.target.value as ProtocolKey)}
                  className="rounded-lg border border-line bg-white px-3 py-2"
                >
                  {PROTOCOL_KEYS.map((k) => (
                    <option key={k} value={k}>
                      {PROTOCOLS[k].label}
                    </option>
                  ))}
                </select>
              </label>
              <label className="flex flex-col gap-1 text-sm">
                <span className="font-medium">Date of the test</span>
                <input
                  type="date"
                  value={testedOn}
                  max={today}
                  onChange={(e) => setTestedOn(e.target.value)}
                  className="rounded-lg border border-line px-3 py-2"
                />
              </label>
            </div>
            <p className="mt-3 text-sm text-ink-soft">{p.instructions}</p>
          </Card>

          {p.maximal && (
            <ReadinessCard answers={answers} onAnswers={setAnswers} stopRead={stopRead} onStopRead={setStopRead} />
          )}

          <Card>
            {FILE_PROTOCOLS.includes(protocol) && (
              <fieldset className="mb-4 flex gap-4 text-sm">
                <legend className="mb-1 font-medium">Result from</legend>
                <label className="flex items-center gap-2">
                  <input type="radio" checked={source === "typed"} onChange={() => setSource("typed")} /> numbers I type
                </label>
                <label className="flex items-center gap-2">
                  <input type="radio" checked={source === "file"} onChange={() => setSource("file")} /> a ride file
                </label>
              </fieldset>
            )}
            {source === "file" ? (
              <FileResult
                protocol={protocol}
                athleteId={forCoach ? athlete.id : undefined}
                upload={upload}
                preview={preview}
                windowStart={windowStart}
                onWindowStart={setWindowStart}
                onReset={resetFile}
                onUploaded={(r) => {
                  setUpload(r);
                  setWindowStart(null);
                }}
              />
            ) : (
              <div className="grid gap-4 sm:grid-cols-2">
                {Typed ? (
                  <Typed fields={fields} onChange={setFields} />
                ) : (
                  <CriticalPowerInputs efforts={efforts} onChange={setEfforts} />
                )}
                <button
                  type="button"
                  className={buttonClass("secondary", "justify-self-start sm:col-span-2")}
                  onClick={askPreview}
                  disabled={previewer.state !== "idle"}
                >
                  {previewer.state !== "idle" ? "Working…" : "Preview the change"}
                </button>
              </div>
            )}
          </Card>
        </div>

        <aside className="flex flex-col gap-4 lg:sticky lg:top-4 lg:self-start" aria-label="Proposal">
          <ProposalCard preview={preview} error={previewer.data?.error} testedOn={testedOn} />
          {preview?.guard.flagged && (
            <GuardCard guard={preview.guard} confirmed={confirmed} onConfirmed={setConfirmed} />
          )}
          {saveError && <FormMessage>{saveError}</FormMessage>}
          <button
            type="button"
            className={buttonClass("primary", "py-2.5")}
            onClick={save}
            disabled={!preview || (needsConfirm && !confirmed) || saver.state !== "idle"}
          >
            {saver.state !== "idle" ? "Saving…" : "Save and rescale"}
          </button>
        </aside>
      </div>
    </>
  );
}
