import { useState } from "react";
import { useFetcher } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import type { CrossCheckPair } from "~/.server/services/cross-check";
import { crossCheckSchema } from "~/lib/field-tests";
import { type FormAnswer, messageOf, useSchemaForm } from "~/lib/forms";

/** One pair as the server builds it (services/cross-check.ts). */
export type CrossCheckView = CrossCheckPair;

const WORD = { agree: "agree", roughly: "roughly agree", disagree: "disagree" } as const;

/** Two close tests side by side, how far apart they are, and the choice of which sets the threshold. */
export function CrossCheckCard({ pair }: { pair: CrossCheckView }) {
  const fetcher = useFetcher<FormAnswer>();
  const [a, b] = pair.tests;
  const [form, fields] = useSchemaForm(crossCheckSchema, fetcher.data, { id: `cross-check-${a.id}-${b.id}` });
  // The service asks for the tick when the change is large; its message then sits beside the checkbox.
  const confirmMessage = messageOf(fetcher.data, "confirm");
  const [needsConfirm, setNeedsConfirm] = useState(false);
  const saved = fetcher.data?.status === "success" ? fetcher.data.message : undefined;
  if (confirmMessage && !needsConfirm) setNeedsConfirm(true);
  if (saved && needsConfirm) setNeedsConfirm(false);
  const refused = messageOf(fetcher.data);
  return (
    <Card data-testid="cross-check">
      <h2 className="font-semibold">Cross-check: two tests {pair.days} days apart</h2>
      <div className="num mt-3 grid grid-cols-2 gap-3">
        {[a, b].map((t) => (
          <div key={t.id} className="rounded-lg border border-line p-3">
            <p className="text-xs text-ink-soft">
              {t.label} · {t.testedOn}
            </p>
            <p className="text-lg font-semibold">{t.display}</p>
          </div>
        ))}
      </div>
      <p className="mt-3 text-sm">
        <strong className={pair.check.agreement === "disagree" ? "text-brick" : "text-teal"}>
          They {WORD[pair.check.agreement]}.
        </strong>{" "}
        {pair.check.message}
      </p>
      <p className="mt-1 text-xs text-ink-soft">
        The difference is taken of the two estimates' mean. Within 3 %: agree; 3–6 %: roughly agree; above 6 %: disagree
        (common practice for repeated maximal tests).
      </p>
      {pair.settled && (
        <p className="mt-2 text-sm" data-testid="cross-check-settled">
          The threshold now comes from this cross-check:{" "}
          {pair.settled.choice === "mean"
            ? "the mean of both tests"
            : `the ${pair.settled.choice === "a" ? "first" : "second"} test`}{" "}
          ({pair.settled.display}).
        </p>
      )}
      <fetcher.Form
        method="post"
        id={form.id}
        onSubmit={form.onSubmit}
        noValidate
        className="mt-3 flex flex-col gap-2 text-sm"
      >
        <input type="hidden" name="intent" value="cross-check" />
        <input type="hidden" name="aId" value={a.id} />
        <input type="hidden" name="bId" value={b.id} />
        <fieldset className="flex flex-wrap gap-3">
          <legend className="mb-1 font-medium">Which sets the threshold?</legend>
          <label className="flex items-center gap-1">
            <input type="radio" name="choice" value="a" /> {a.label} ({a.display})
          </label>
          <label className="flex items-center gap-1">
            <input type="radio" name="choice" value="b" /> {b.label} ({b.display})
          </label>
          <label className="flex items-center gap-1">
            <input type="radio" name="choice" value="mean" defaultChecked /> Their mean ({pair.meanDisplay})
          </label>
          {fields.choice.errors?.[0] && <p className="w-full text-brick">{fields.choice.errors[0]}</p>}
        </fieldset>
        {needsConfirm && (
          <div className="flex flex-col gap-1">
            {confirmMessage && <p className="text-brick">{confirmMessage}</p>}
            <label className="flex items-center gap-2 text-brick">
              <input type="checkbox" name="confirmed" value="1" /> I have read why this change is large and want it
            </label>
          </div>
        )}
        <div>
          <button className={buttonClass("primary", "py-1.5")} disabled={fetcher.state !== "idle"}>
            Set the threshold and rescale
          </button>
        </div>
        {saved && <FormMessage tone="ok">{saved}</FormMessage>}
        {refused && <FormMessage tone="error">{refused}</FormMessage>}
      </fetcher.Form>
    </Card>
  );
}
