import { useMemo, useState } from "react";
import { Form, useNavigation } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { FormMessage } from "~/components/ui/field";
import { BLOCK_LABEL, newBlock, SPORTS, SPORT_LABEL } from "~/lib/sessions";
import { BLOCK_KINDS, validateBlocks, type Block, type Metric } from "~/lib/training";
import { SessionEstimate } from "./session-builder/estimate";
import { keyed, StepList, type Keyed } from "./session-builder/step-list";

export interface BuilderValues {
  name: string;
  sport: string;
  description: string;
  tags: string[];
  blocks: Block[];
}

export function SessionBuilder({
  initial,
  errors = {},
  submitLabel,
}: {
  initial: BuilderValues;
  errors?: Record<string, string | undefined>;
  submitLabel: string;
}) {
  const [name, setName] = useState(initial.name);
  const [sport, setSport] = useState(initial.sport);
  const [description, setDescription] = useState(initial.description);
  const [tags, setTags] = useState(initial.tags.join(", "));
  const [items, setItems] = useState<Keyed[]>(() => initial.blocks.map(keyed));
  const [reference, setReference] = useState(250);
  const busy = useNavigation().state === "submitting";
  const blocks = items.map((i) => i.block);

  const clientErrors = useMemo(() => validateBlocks(blocks), [blocks]);
  const allErrors: Record<string, string | undefined> = { ...clientErrors, ...errors };
  // A half-typed field (a duration "abc", an empty percentage) is not a number: the estimate waits for valid blocks.
  const blocksValid = Object.values(clientErrors).every((v) => !v);
  const defaultMetric: Metric = sport === "run" || sport === "swim" ? "pace" : "power";

  const payload = JSON.stringify({
    name,
    sport,
    description,
    tags: tags
      .split(",")
      .map((t) => t.trim())
      .filter(Boolean),
    blocks,
  });
  const errorList = Object.entries(allErrors).filter(([, v]) => v) as [string, string][];

  return (
    <Form method="post" className="grid gap-6 lg:grid-cols-[1fr_22rem]">
      <input type="hidden" name="payload" value={payload} />
      <div className="flex flex-col gap-4">
        {errors.form && <FormMessage>{errors.form}</FormMessage>}
        <div className="grid gap-3 rounded-xl border border-line bg-white p-4 sm:grid-cols-2">
          <TextField label="Name" value={name} onChange={setName} error={allErrors.name} required />
          <label className="flex flex-col gap-1 text-sm">
            <span className="font-medium">Sport</span>
            <select
              value={sport}
              onChange={(e) => setSport(e.target.value)}
              className="rounded-lg border border-line bg-white px-3 py-2"
            >
              {SPORTS.map((s) => (
                <option key={s} value={s}>
                  {SPORT_LABEL[s]}
                </option>
              ))}
            </select>
          </label>
          <label className="flex flex-col gap-1 text-sm sm:col-span-2">
            <span className="font-medium">Description</span>
            <textarea
              value={description}
              onChange={(e) => setDescription(e.target.value)}
              rows={2}
              className="rounded-lg border border-line px-3 py-2"
            />
          </label>
          <TextField
            label="Tags (comma-separated)"
            value={tags}
            onChange={setTags}
            error={allErrors.tags}
            className="sm:col-span-2"
          />
        </div>

        <section aria-labelledby="blocks-heading" className="flex flex-col gap-3">
          <div className="flex flex-wrap items-center justify-between gap-2">
            <h2 id="blocks-heading" className="text-lg font-semibold">
              Blocks
            </h2>
            <div className="flex flex-wrap gap-1" role="group" aria-label="Add a block">
              {BLOCK_KINDS.map((k) => (
                <button
                  key={k}
                  type="button"
                  className={buttonClass("secondary", "px-2.5 py-1")}
                  onClick={() => setItems((l) => [...l, keyed(newBlock(k, defaultMetric))])}
                >
                  + {BLOCK_LABEL[k]}
                </button>
              ))}
            </div>
          </div>
          {allErrors.blocks && <p className="text-sm text-brick">{allErrors.blocks}</p>}
          <StepList items={items} setItems={setItems} errors={allErrors} />
        </section>
      </div>

      <aside className="flex flex-col gap-4 lg:sticky lg:top-4 lg:self-start" aria-label="Preview and estimates">
        <SessionEstimate
          blocks={blocks}
          sport={sport}
          valid={blocksValid}
          reference={reference}
          onReference={setReference}
        />
        {errorList.length > 0 && (
          <div role="alert" className="rounded-xl border border-brick/40 bg-brick/10 p-3 text-sm text-brick">
            {errorList.length} field{errorList.length === 1 ? " needs" : "s need"} attention before saving.
          </div>
        )}
        <button type="submit" className={buttonClass("primary", "py-2.5")} disabled={busy}>
          {busy ? "Saving…" : submitLabel}
        </button>
      </aside>
    </Form>
  );
}

function TextField({
  label,
  value,
  onChange,
  error,
  className = "",
  required,
}: {
  label: string;
  value: string;
  onChange: (v: string) => void;
  error?: string;
  className?: string;
  required?: boolean;
}) {
  return (
    <label className={`flex flex-col gap-1 text-sm ${className}`}>
      <span className="font-medium">{label}</span>
      <input
        value={value}
        onChange={(e) => onChange(e.target.value)}
        required={required}
        aria-invalid={error ? true : undefined}
        className={`rounded-lg border px-3 py-2 ${error ? "border-brick" : "border-line"}`}
      />
      {error && <span className="text-brick">{error}</span>}
    </label>
  );
}
