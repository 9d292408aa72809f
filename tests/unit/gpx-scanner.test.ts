import fc from "fast-check";
import { XMLParser } from "fast-xml-parser";
import { describe, expect, it } from "vitest";
import { readGpx } from "~/lib/training/activity-gpx";

/**
 * The GPX scanner against a general-purpose XML parser (fast-xml-parser) on generated files: namespace prefixes,
 * attribute order and quotes, self-closing points, nested extension shapes, whitespace, waypoints and routes that
 * are not track points. The reference reads the same fields from the parsed document.
 */
function reference(text: string) {
  const doc = new XMLParser({
    ignoreAttributes: false,
    attributeNamePrefix: "@",
    removeNSPrefix: true,
    isArray: (n) => n === "trk" || n === "trkseg" || n === "trkpt",
  }).parse(text, true);
  const leaves = (node: unknown, out: Record<string, unknown> = {}) => {
    if (node && typeof node === "object")
      for (const [k, v] of Object.entries(node)) {
        if (v && typeof v === "object") leaves(v, out);
        else out[k.toLowerCase()] = v;
      }
    return out;
  };
  return (doc.gpx.trk ?? [])
    .flatMap((trk: any) => (trk?.trkseg ?? []).flatMap((seg: any) => seg?.trkpt ?? []))
    .map((pt: any) => {
      const ext = leaves(pt?.extensions);
      return {
        time: String(pt?.time ?? ""),
        lat: Number(pt["@lat"]),
        lon: Number(pt["@lon"]),
        power: ext.power === undefined ? undefined : Number(ext.power),
        hr: ext.hr === undefined ? undefined : Number(ext.hr),
        cad: ext.cad === undefined ? undefined : Number(ext.cad),
      };
    });
}

const point = fc.record({
  s: fc.integer({ min: 0, max: 5 }),
  lat: fc.double({ min: -60, max: 60, noNaN: true }).map((x) => Number(x.toFixed(6))),
  lon: fc.double({ min: -60, max: 60, noNaN: true }).map((x) => Number(x.toFixed(6))),
  power: fc.option(fc.integer({ min: 0, max: 1500 }), { nil: undefined }),
  hr: fc.option(fc.integer({ min: 40, max: 210 }), { nil: undefined }),
  latFirst: fc.boolean(),
  quote: fc.constantFrom('"', "'"),
  prefix: fc.constantFrom("", "g:"),
  extPrefix: fc.constantFrom("", "ns3:", "gpxtpx:"),
  nest: fc.boolean(),
  ws: fc.constantFrom("", "\n  ", " "),
});

type Point = typeof point extends fc.Arbitrary<infer T> ? T : never;

function file(points: Point[]) {
  let t = Date.UTC(2026, 10, 14, 8);
  const body = points.map((p) => {
    t += (p.s + 1) * 1000;
    const q = p.quote;
    const attrs = p.latFirst
      ? `lat=${q}${p.lat}${q} lon=${q}${p.lon}${q}`
      : `lon=${q}${p.lon}${q}  lat=${q}${p.lat}${q}`;
    const e = p.extPrefix;
    const hr = p.hr === undefined ? "" : `<${e}hr>${p.hr}</${e}hr>`;
    const power = p.power === undefined ? "" : `<power>${p.power}</power>`;
    const inner = p.nest ? `<${e}TrackPointExtension>${hr}</${e}TrackPointExtension>${power}` : `${power}${hr}`;
    const ext = inner ? `<${p.prefix}extensions>${inner}</${p.prefix}extensions>` : "";
    return `<${p.prefix}trkpt ${attrs}>${p.ws}<${p.prefix}ele>12.5</${p.prefix}ele><${p.prefix}time>${new Date(t).toISOString()}</${p.prefix}time>${p.ws}${ext}</${p.prefix}trkpt>`;
  });
  return `<?xml version="1.0"?>\n<gpx version="1.1" xmlns:g="http://www.topografix.com/GPX/1/1"><wpt lat="1" lon="2"><time>2026-01-01T00:00:00Z</time></wpt><rte><rtept lat="3" lon="4"/></rte><trk><name>x</name><trkseg>${body.join("\n")}</trkseg></trk></gpx>\n`;
}

/** The scanner's columns as one object per point (NaN, its mark for a missing reading, as undefined). */
function pointsOf(text: string) {
  const { points } = readGpx(text);
  const v = (x: number) => (Number.isNaN(x) ? undefined : x);
  return points.t.map((t, i) => ({
    t,
    power: v(points.power[i]),
    hr: v(points.hr[i]),
    cadence: v(points.cadence[i]),
    distance: v(points.distance[i]),
  }));
}

describe("GPX scanner", () => {
  it("reads the same times, positions, power and heart rate as a general-purpose XML parser", () => {
    fc.assert(
      fc.property(fc.array(point, { minLength: 1, maxLength: 30 }), (pts) => {
        const text = file(pts);
        const ref = reference(text);
        const got = pointsOf(text);
        expect(got.length).toBe(ref.length);
        const t0 = Date.parse(ref[0].time);
        got.forEach((g, i) => {
          expect(g.t).toBe((Date.parse(ref[i].time) - t0) / 1000);
          expect(g.power).toBe(ref[i].power);
          expect(g.hr).toBe(ref[i].hr);
        });
      }),
      { numRuns: 200 },
    );
  });

  it("reads odd but valid files as a general-purpose XML parser does: comments, CDATA, extra attributes, gaps", () => {
    // Each point may hide markup in comments (a commented-out point or power reading is no reading), wrap its time or
    // power in CDATA, carry extra attributes before or after lat/lon, lack a time (no point) or any extension.
    const odd = fc.record({
      s: fc.integer({ min: 0, max: 7 }),
      lat: fc.double({ min: -60, max: 60, noNaN: true }).map((x) => Number(x.toFixed(6))),
      lon: fc.double({ min: -60, max: 60, noNaN: true }).map((x) => Number(x.toFixed(6))),
      power: fc.option(fc.integer({ min: 0, max: 1500 }), { nil: undefined }),
      hr: fc.option(fc.integer({ min: 40, max: 210 }), { nil: undefined }),
      cad: fc.option(fc.integer({ min: 0, max: 130 }), { nil: undefined }),
      hasTime: fc.boolean(),
      cdataTime: fc.boolean(),
      cdataPower: fc.boolean(),
      commentBefore: fc.constantFrom(
        "",
        "<!-- a note -->",
        '<!-- <trkpt lat="1" lon="1"><time>2020-01-01T00:00:00Z</time></trkpt> -->',
      ),
      commentInside: fc.constantFrom("", "<!--<power>9999</power>-->", "<!-- </trkpt> -->"),
      extra: fc.constantFrom("", ' ele="3"', " xml:lang='en'"),
      prefix: fc.constantFrom("", "g:"),
      extPrefix: fc.constantFrom("", "ns3:", "gpxtpx:"),
    });
    fc.assert(
      fc.property(fc.array(odd, { minLength: 1, maxLength: 25 }), (pts) => {
        let t = Date.UTC(2026, 10, 14, 8, 0, 0, 250);
        const body = pts.map((p) => {
          t += (p.s + 1) * 1000;
          const g = p.prefix;
          const e = p.extPrefix;
          const iso = new Date(t).toISOString();
          const time = p.hasTime ? `<${g}time>${p.cdataTime ? `<![CDATA[${iso}]]>` : iso}</${g}time>` : "";
          const power =
            p.power === undefined ? "" : `<power>${p.cdataPower ? `<![CDATA[${p.power}]]>` : p.power}</power>`;
          const tpx = [
            p.hr === undefined ? "" : `<${e}hr>${p.hr}</${e}hr>`,
            p.cad === undefined ? "" : `<${e}cad>${p.cad}</${e}cad>`,
          ].join("");
          const inner = `${p.commentInside}${power}${tpx ? `<${e}TrackPointExtension>${tpx}</${e}TrackPointExtension>` : ""}`;
          const ext = inner ? `<${g}extensions>${inner}</${g}extensions>` : "";
          return `${p.commentBefore}<${g}trkpt${p.extra} lon="${p.lon}" lat="${p.lat}"${p.extra ? "" : ' src="x"'}>${time}<${g}ele>1</${g}ele>${ext}</${g}trkpt>`;
        });
        const text = `<?xml version="1.0"?>\n<!-- made by a test -->\n<g:gpx version="1.1" xmlns:g="http://www.topografix.com/GPX/1/1" xmlns="http://www.topografix.com/GPX/1/1"><g:trk><g:trkseg>${body.join("\n")}</g:trkseg></g:trk></g:gpx>\n`;
        const ref = reference(text.replace("<g:gpx", "<gpx").replace("</g:gpx>", "</gpx>")).filter(
          (r: any) => r.time !== "",
        );
        if (ref.length === 0) {
          expect(() => readGpx(text)).toThrow(/readable time/);
          return;
        }
        const got = pointsOf(text);
        expect(got.length).toBe(ref.length);
        const t0 = Date.parse(ref[0].time);
        got.forEach((g, i) => {
          expect(g.t).toBe((Date.parse(ref[i].time) - t0) / 1000);
          expect(g.power).toBe(ref[i].power);
          expect(g.hr).toBe(ref[i].hr);
          expect(g.cadence).toBe(ref[i].cad);
        });
      }),
      { numRuns: 300 },
    );
  });

  it("reads self-closing points and refuses an unclosed point or a truncated file", () => {
    expect(() => readGpx('<gpx><trk><trkseg><trkpt lat="1" lon="2"/></trkseg></trk></gpx>')).toThrow(/readable time/);
    expect(() =>
      readGpx('<gpx><trk><trkseg><trkpt lat="1" lon="2"><time>2026-01-01T00:00:00Z</time></trkseg></trk></gpx>'),
    ).toThrow(/not closed/);
    expect(() => readGpx('<gpx><trk><trkseg><trkpt lat="1" lon="2"><time>2026-01-01T00:00:00Z</time></trkpt>')).toThrow(
      /well-formed/,
    );
  });
});
