import { buttonClass } from "~/components/ui/button";
import type { ProtocolKey } from "~/lib/protocols";

/** What a typed result holds: the protocol's own fields by name, and for critical power a list of efforts. */
export type TypedFields = Record<string, string>;
export type Effort = { duration: string; meanW: string };
export const FIRST_EFFORTS: Effort[] = [
  { duration: "3:00", meanW: "" },
  { duration: "12:00", meanW: "" },
];

type Props = { fields: TypedFields; onChange: (fields: TypedFields) => void };

function NumberInput({
  name,
  label,
  fields,
  onChange,
  ...props
}: Props & { name: string; label: string } & Omit<React.InputHTMLAttributes<HTMLInputElement>, "onChange" | "name">) {
  return (
    <label className="flex flex-col gap-1 text-sm">
      <span className="font-medium">{label}</span>
      <input
        value={fields[name] ?? ""}
        onChange={(e) => onChange({ ...fields, [name]: e.target.value })}
        className="num rounded-lg border border-line px-3 py-2"
        {...props}
      />
    </label>
  );
}

function Choice({
  name,
  label,
  fallback,
  options,
  fields,
  onChange,
}: Props & { name: string; label: string; fallback: string; options: [string, string][] }) {
  return (
    <label className="flex flex-col gap-1 text-sm">
      <span className="font-medium">{label}</span>
      <select
        value={fields[name] ?? fallback}
        onChange={(e) => onChange({ ...fields, [name]: e.target.value })}
        className="rounded-lg border border-line bg-white px-3 py-2"
      >
        {options.map(([value, text]) => (
          <option key={value} value={value}>
            {text}
          </option>
        ))}
      </select>
    </label>
  );
}

export function RampInputs(p: Props) {
  return (
    <>
      <NumberInput {...p} name="bestOneMinuteW" label="Best one-minute power (W)" inputMode="decimal" />
      <NumberInput
        {...p}
        name="rampRateWPerMin"
        label="Ramp rate (W added per minute)"
        inputMode="decimal"
        placeholder="20"
      />
    </>
  );
}

export function TwentyMinuteInputs(p: Props) {
  return <NumberInput {...p} name="meanW" label="20-minute mean power (W)" inputMode="decimal" />;
}

export function EightMinuteInputs(p: Props) {
  return (
    <>
      <NumberInput {...p} name="meanW" label="First 8-minute mean power (W)" inputMode="decimal" />
      <NumberInput {...p} name="secondMeanW" label="Second 8-minute mean power (W, optional)" inputMode="decimal" />
    </>
  );
}

export function HrThirtyInputs(p: Props) {
  return (
    <>
      <Choice
        {...p}
        name="sport"
        label="Sport"
        fallback="bike"
        options={[
          ["bike", "Bike"],
          ["run", "Run"],
        ]}
      />
      <NumberInput {...p} name="meanHr" label="Mean heart rate, last 20 minutes (bpm)" inputMode="numeric" />
    </>
  );
}

export function RunRaceInputs(p: Props) {
  return (
    <>
      <NumberInput {...p} name="distanceM" label="Race distance (m)" inputMode="numeric" placeholder="5000" />
      <NumberInput {...p} name="time" label="Race time (h:mm:ss or m:ss)" placeholder="20:30" />
    </>
  );
}

export function SwimPairInputs(p: Props) {
  return (
    <>
      <NumberInput {...p} name="t400" label="400 m time (m:ss)" placeholder="6:00" />
      <NumberInput {...p} name="t200" label="200 m time (m:ss)" placeholder="2:50" />
    </>
  );
}

export function ManualInputs(p: Props) {
  return (
    <>
      <Choice
        {...p}
        name="sport"
        label="Sport"
        fallback="bike"
        options={[
          ["bike", "Bike"],
          ["run", "Run"],
          ["swim", "Swim"],
        ]}
      />
      <Choice
        {...p}
        name="metric"
        label="Threshold of"
        fallback="power"
        options={[
          ["power", "power (W)"],
          ["heart_rate", "heart rate (bpm)"],
          ["pace", "pace (s per km, or per 100 m for swimming)"],
        ]}
      />
      <NumberInput {...p} name="value" label="Value" inputMode="decimal" />
    </>
  );
}

export function CriticalPowerInputs({
  efforts,
  onChange,
}: {
  efforts: Effort[];
  onChange: (efforts: Effort[]) => void;
}) {
  const edit = (i: number, change: Partial<Effort>) =>
    onChange(efforts.map((x, k) => (k === i ? { ...x, ...change } : x)));
  return (
    <>
      {efforts.map((e, i) => (
        <div key={i} className="grid grid-cols-2 gap-2 sm:col-span-2">
          <label className="flex flex-col gap-1 text-sm">
            <span className="font-medium">Effort {i + 1} duration</span>
            <input
              value={e.duration}
              onChange={(ev) => edit(i, { duration: ev.target.value })}
              className="num rounded-lg border border-line px-3 py-2"
            />
          </label>
          <label className="flex flex-col gap-1 text-sm">
            <span className="font-medium">Effort {i + 1} mean power (W)</span>
            <input
              value={e.meanW}
              inputMode="decimal"
              onChange={(ev) => edit(i, { meanW: ev.target.value })}
              className="num rounded-lg border border-line px-3 py-2"
            />
          </label>
        </div>
      ))}
      {efforts.length < 4 && (
        <button
          type="button"
          className={buttonClass("ghost", "justify-self-start")}
          onClick={() => onChange([...efforts, { duration: "6:00", meanW: "" }])}
        >
          + Add an effort
        </button>
      )}
    </>
  );
}

/** The typed inputs of every protocol but critical power (whose efforts are a list, see `CriticalPowerInputs`). */
export const TYPED_INPUTS: Record<Exclude<ProtocolKey, "critical_power">, (p: Props) => React.ReactNode> = {
  ramp: RampInputs,
  twenty_minute: TwentyMinuteInputs,
  eight_minute: EightMinuteInputs,
  hr_thirty: HrThirtyInputs,
  run_race: RunRaceInputs,
  swim_pair: SwimPairInputs,
  manual: ManualInputs,
};

/** The body's `inputs` for what is typed now, in the shape `app/lib/field-tests.ts` reads per protocol. */
export function typedInputs(protocol: ProtocolKey, fields: TypedFields, efforts: Effort[]) {
  if (protocol === "critical_power") return { efforts: efforts.filter((e) => e.meanW !== "") };
  if (protocol === "hr_thirty") return { sport: fields.sport ?? "bike", meanHr: fields.meanHr };
  if (protocol === "manual")
    return { sport: fields.sport ?? "bike", metric: fields.metric ?? "power", value: fields.value };
  return fields;
}
