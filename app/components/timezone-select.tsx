import { useEffect, useState } from "react";
import { SelectField } from "./ui/field";

const COMMON = [
  "UTC",
  "Europe/London",
  "Europe/Berlin",
  "Europe/Madrid",
  "Europe/Stockholm",
  "America/New_York",
  "America/Chicago",
  "America/Denver",
  "America/Los_Angeles",
  "America/Sao_Paulo",
  "Africa/Johannesburg",
  "Asia/Tokyo",
  "Asia/Singapore",
  "Australia/Sydney",
  "Pacific/Auckland",
];

function allZones(): string[] {
  const intl = Intl as typeof Intl & { supportedValuesOf?: (k: string) => string[] };
  return intl.supportedValuesOf ? ["UTC", ...intl.supportedValuesOf("timeZone").filter((z) => z !== "UTC")] : COMMON;
}

/** Pre-selects the browser's zone after hydration; the server renders a stable default. */
export function TimezoneSelect({
  defaultValue,
  error,
  name = "timezone",
}: {
  defaultValue?: string;
  error?: string;
  name?: string;
}) {
  const [zone, setZone] = useState(defaultValue ?? "UTC");
  const [zones, setZones] = useState<string[]>(() => Array.from(new Set([defaultValue ?? "UTC", ...COMMON])));
  useEffect(() => {
    // The browser's zone and zone list exist only after hydration; the server drew the stable default first.
    // eslint-disable-next-line react-hooks/set-state-in-effect -- reading the browser once after hydration is what effects are for
    setZones(allZones());
    if (!defaultValue) {
      const local = Intl.DateTimeFormat().resolvedOptions().timeZone;
      if (local) setZone(local);
    }
  }, [defaultValue]);
  return (
    <SelectField label="Time zone" name={name} value={zone} onChange={(e) => setZone(e.target.value)} error={error}>
      {zones.map((z) => (
        <option key={z} value={z}>
          {z.replaceAll("_", " ")}
        </option>
      ))}
    </SelectField>
  );
}
