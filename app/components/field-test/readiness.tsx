import { Card } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { READINESS } from "~/lib/protocols";

export type Answer = "yes" | "no" | null;

/** The screening a maximal test asks for before anyone goes all-out; the server refuses a save without it. */
export function ReadinessCard({
  answers,
  onAnswers,
  stopRead,
  onStopRead,
}: {
  answers: Answer[];
  onAnswers: (a: Answer[]) => void;
  stopRead: boolean;
  onStopRead: (read: boolean) => void;
}) {
  return (
    <Card className="border-brick/40" aria-labelledby="readiness-heading">
      <h2 id="readiness-heading" className="font-semibold text-brick">
        Readiness screening
      </h2>
      <p className="mt-1 text-sm">This is a maximal test. Answer each question honestly before you go all-out.</p>
      <ol className="mt-3 flex flex-col gap-2 text-sm">
        {READINESS.questions.map((q, i) => (
          <li key={q} className="flex flex-wrap items-center justify-between gap-2">
            <span className="flex-1">{q}</span>
            <span className="flex gap-3" role="radiogroup" aria-label={q}>
              {(["no", "yes"] as const).map((a) => (
                <label key={a} className="flex items-center gap-1">
                  <input
                    type="radio"
                    name={`q${i}`}
                    checked={answers[i] === a}
                    onChange={() => onAnswers(answers.map((x, k) => (k === i ? a : x)))}
                  />{" "}
                  {a}
                </label>
              ))}
            </span>
          </li>
        ))}
      </ol>
      {answers.includes("yes") && (
        <div className="mt-3">
          <FormMessage>{READINESS.yesAdvice}</FormMessage>
        </div>
      )}
      <div className="mt-4 rounded-lg bg-brick/5 p-3 text-sm">
        <p className="font-medium">Stop at once if you notice:</p>
        <ul className="mt-1 list-disc pl-5">
          {READINESS.stopSigns.map((x) => (
            <li key={x}>{x}</li>
          ))}
        </ul>
        <p className="mt-2 text-xs text-ink-soft">{READINESS.stopAdvice}</p>
        <label className="mt-3 flex items-center gap-2 font-medium">
          <input type="checkbox" checked={stopRead} onChange={(e) => onStopRead(e.target.checked)} /> I have read the
          stop signs
        </label>
      </div>
    </Card>
  );
}
