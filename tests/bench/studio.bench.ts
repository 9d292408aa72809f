import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { mondayOf, todayIn } from "~/lib/dates";
import { STUDIO_VERSION } from "../../scripts/studio";
import { round, type BenchFigure } from "./lib";

/**
 * The studio pages at scale: a large studio (500 athletes, 5 years of sessions and rides) against a small one (20
 * athletes, 1 year), both made by `scripts/studio.ts` from seed 42 and kept in the temp folder between runs (keyed by
 * generator version, size and week, since the studio is laid out around the current week). Each page is measured
 * per row the database returned, so a missing index (more time per row) or an unbounded read (many more rows than
 * the page shows, printed beside it) stands out. The two studios cannot share one process (one connection each), so
 * rounds alternate small and big processes and each figure takes the median round. `BENCH_STUDIO=off` skips it
 * (the first run generates the large studio: about two minutes).
 */
const SMALL = { athletes: 20, years: 1 };
const BIG = { athletes: 500, years: 5 };
const ROUNDS = 3;

function studioFile(size: { athletes: number; years: number }) {
  const file = path.join(
    os.tmpdir(),
    `pacewright-studio-v${STUDIO_VERSION}-seed42-a${size.athletes}-y${size.years}-${mondayOf(todayIn("UTC"))}.sqlite`,
  );
  if (!fs.existsSync(file)) {
    console.log(`[bench] generating the studio ${path.basename(file)} (cached for later runs)…`);
    const tmp = `${file}.partial`;
    fs.rmSync(tmp, { force: true });
    execFileSync(
      process.execPath,
      [
        "--import",
        "tsx",
        "scripts/studio.ts",
        "--seed",
        "42",
        "--athletes",
        String(size.athletes),
        "--years",
        String(size.years),
        "--db",
        tmp,
        "--force",
      ],
      { stdio: ["ignore", "ignore", "inherit"], env: { ...process.env, DATABASE_URL: "" } },
    );
    fs.renameSync(tmp, file);
  }
  return file;
}

type Measured = Record<string, { ms: number; statements: number; rows: number }>;
function measure(file: string): Measured {
  const out = execFileSync(process.execPath, ["--import", "tsx", "tests/bench/studio-pages.ts", file], {
    env: { ...process.env, DATABASE_URL: "", STUDIO_RUNS: "5" },
    encoding: "utf8",
    stdio: ["ignore", "pipe", "inherit"],
  });
  const line = out.split("\n").find((l) => l.startsWith("STUDIO "));
  if (!line) throw new Error(`no figures from studio-pages on ${file}`);
  return JSON.parse(line.slice(7)) as Measured;
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

export async function run(): Promise<BenchFigure[]> {
  if (process.env.BENCH_STUDIO === "off") return [];
  const small = studioFile(SMALL);
  const big = studioFile(BIG);
  const rounds: { small: Measured; big: Measured }[] = [];
  for (let i = 0; i < ROUNDS; i++) {
    // Alternate which goes first, as compare() does.
    if (i % 2 === 0) {
      const s = measure(small);
      rounds.push({ small: s, big: measure(big) });
    } else {
      const b = measure(big);
      rounds.push({ small: measure(small), big: b });
    }
  }
  return Object.keys(rounds[0].small).map((page) => {
    const s = rounds.map((r) => r.small[page]);
    const b = rounds.map((r) => r.big[page]);
    const perRowSmall = median(s.map((x) => x.ms / Math.max(1, x.rows)));
    const perRowBig = median(b.map((x) => x.ms / Math.max(1, x.rows)));
    return {
      name: `studio ${page}, per row read: ${BIG.athletes} athletes × ${BIG.years} years vs ${SMALL.athletes} × ${SMALL.years}`,
      subjectMs: round(perRowBig),
      baselineMs: round(perRowSmall),
      baseline: `the same page on the small studio, per row read`,
      ratio: round(perRowBig / Math.max(perRowSmall, 1e-9)),
      aim: 3,
      note: `ms per row; big ${round(median(b.map((x) => x.ms)))} ms for ${b[0].rows} rows in ${b[0].statements} statements, small ${round(median(s.map((x) => x.ms)))} ms for ${s[0].rows} rows in ${s[0].statements} statements`,
    };
  });
}
