import fs from "node:fs";
import { createRequire } from "node:module";
import fc from "fast-check";
import ical from "ical-generator";
import ICAL from "ical.js";
import { describe, expect, it } from "vitest";

/**
 * ical-generator folds content lines at 75 octets (RFC 5545 §3.1). Its own code counted each character's bytes by
 * running a TextEncoder over it, about half of a large feed's CPU; patches/ical-generator+*.patch (applied by
 * patch-package at install) counts them from the character codes, returns short ASCII lines as they are and copies
 * the runs between folds as slices instead of one character at a time. The reference below is the library's original
 * folding, kept verbatim: the patched output must match it byte for byte.
 */
function referenceFold(input: string): string {
  return input
    .split("\r\n")
    .map((line) => {
      let out = "";
      let n = 0;
      for (let r = 0; r < line.length; r++) {
        let ch = line.charAt(r);
        if (ch >= "\ud800" && ch <= "\udbff") ch += line.charAt(++r);
        const bytes = new TextEncoder().encode(ch).length;
        n += bytes;
        if (n > 74) {
          out += "\r\n ";
          n = bytes;
        }
        out += ch;
      }
      return out;
    })
    .join("\r\n");
}

const unfold = (s: string) => s.replace(/\r\n /g, "");

function calendarWith(text: string) {
  const cal = ical({ name: "Folding check", prodId: { company: "pacewright", product: "tests" } });
  cal.createEvent({
    id: "fold-1",
    start: new Date(Date.UTC(2027, 0, 4, 7)),
    end: new Date(Date.UTC(2027, 0, 4, 8)),
    stamp: new Date(Date.UTC(2026, 11, 1)),
    summary: text.slice(0, 40) || "x",
    description: text,
  });
  return cal.toString();
}

describe("calendar line folding (RFC 5545 §3.1)", () => {
  it("the installed library carries the patch", () => {
    const require = createRequire(import.meta.url);
    const dir = require.resolve("ical-generator").replace(/index\.c?js$/, "");
    for (const file of ["index.mjs", "index.cjs"])
      expect(fs.readFileSync(`${dir}${file}`, "utf8")).not.toContain("new TextEncoder().encode(i).length");
  });

  it("folds exactly as the library's original code, for ASCII, accents, CJK, emoji and lone surrogates", () => {
    const pieces = fc.constantFrom(
      "a",
      "Z",
      " ",
      "é",
      "ß",
      "→",
      "水",
      "🚴",
      "👍🏽",
      "\ud800",
      "\udc00",
      "Ω",
      ",",
      ";",
      "\n",
      "x".repeat(70),
    );
    fc.assert(
      fc.property(
        fc.array(pieces, { maxLength: 200 }).map((a) => a.join("")),
        (text) => {
          const out = calendarWith(text);
          expect(out).toBe(referenceFold(unfold(out)));
          for (const line of out.split("\r\n")) expect(Buffer.byteLength(line, "utf8")).toBeLessThanOrEqual(75);
        },
      ),
      { numRuns: 300 },
    );
  });

  it("an independent parser reads the description back whole", () => {
    const text = "Steady 🚴 at 72–76 % — café stop, 水 ".repeat(12).trim();
    const parsed = new ICAL.Component(ICAL.parse(calendarWith(text)));
    expect(parsed.getFirstSubcomponent("vevent")!.getFirstPropertyValue("description")).toBe(text);
  });
});
