import { describe, expect, it } from "vitest";
import { dateFormat, formatDate, formatDateTime, formatLongDay, numberFormat } from "~/lib/format";
import { formatPrice } from "~/lib/shop";

// Reference: the platform's ICU data through a freshly built Intl formatter each time (what the code did before the
// formatters were cached); the cached ones must print exactly the same.
describe("formatters", () => {
  const at = "2026-03-29T00:30:00Z"; // the night the clocks go forward in Europe
  it("print what a fresh Intl formatter prints, in the given zone", () => {
    for (const zone of ["UTC", "Europe/Oslo", "America/Los_Angeles", "Pacific/Kiritimati"]) {
      expect(formatDate(at, zone)).toBe(
        new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: zone }).format(
          new Date(at),
        ),
      );
      expect(formatDateTime(at, zone)).toBe(
        new Intl.DateTimeFormat("en-GB", {
          day: "numeric",
          month: "short",
          hour: "2-digit",
          minute: "2-digit",
          timeZone: zone,
        }).format(new Date(at)),
      );
    }
    expect(formatDate(at, "America/Los_Angeles")).toBe("28 Mar 2026");
    expect(formatDateTime(at, "Europe/Oslo")).toBe("29 Mar, 01:30");
    expect(formatLongDay(new Date(at), "Pacific/Kiritimati")).toBe("Sunday 29 March");
  });
  it("prices in the order's currency", () => {
    expect(formatPrice(4900, "EUR")).toBe("€49.00");
    expect(formatPrice(123456, "GBP")).toBe("£1,234.56");
  });
  it("make one formatter per option set and keep it", () => {
    expect(dateFormat({ timeZone: "Europe/Oslo", month: "long" })).toBe(
      dateFormat({ timeZone: "Europe/Oslo", month: "long" }),
    );
    expect(dateFormat({ timeZone: "Europe/Oslo" })).not.toBe(dateFormat({ timeZone: "UTC" }));
    expect(numberFormat({ style: "currency", currency: "USD" })).toBe(
      numberFormat({ style: "currency", currency: "USD" }),
    );
  });
});
