import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { verdict, type BenchFigure } from "./lib";

// Benchmarks report; they never fail the build. Each gets a fresh database built by the real migrations.
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "pacewright-bench-"));
process.env.DATABASE_PATH = path.join(dir, "bench.sqlite");
process.env.UPLOAD_DIR = path.join(dir, "uploads");
process.env.MIGRATE_QUIET = "1";
process.env.PACEWRIGHT_FAKES = "on";
// As `npm run serve` runs: React's production build renders the pages (the development build is several times slower).
process.env.NODE_ENV ??= "production";

const only = process.argv[2];
const here = path.dirname(new URL(import.meta.url).pathname);
const files = fs
  .readdirSync(here)
  .filter((f) => f.endsWith(".bench.ts") && (!only || f.includes(only)))
  .sort();

const { migrator } = await import("../../db/migrator");
await migrator().up();

const figures: BenchFigure[] = [];
for (const file of files) {
  const mod = (await import(pathToFileURL(path.join(here, file)).href)) as { run(): Promise<BenchFigure[]> };
  try {
    const got = await mod.run();
    figures.push(...got);
  } catch (err) {
    console.error(`[bench] ${file} failed:`, err);
  }
}

const report = {
  machine: { cpus: os.cpus().length, node: process.version },
  at: new Date().toISOString(),
  figures: figures.map((f) => ({ ...f, verdict: verdict(f) })),
};
const out = path.resolve(process.env.BENCH_REPORT ?? "tests/bench/report.json");
fs.writeFileSync(out, JSON.stringify(report, null, 2));
console.table(
  figures.map((f) => ({
    bench: f.name,
    "subject ms": f.subjectMs,
    "baseline ms": f.baselineMs,
    ratio: f.ratio,
    aim: f.aim === undefined ? "" : `${f.higherIsBetter ? "≥" : "≤"} ${f.aim}`,
    verdict: verdict(f),
  })),
);
for (const f of figures) console.log(`- ${f.name}: against ${f.baseline}${f.note ? `; ${f.note}` : ""}`);
const missed = figures.filter((f) => verdict(f) === "misses aim");
console.log(
  missed.length
    ? `${missed.length} of ${figures.filter((f) => f.aim !== undefined).length} figures with an aim miss it: ${missed.map((f) => f.name).join("; ")}`
    : `every figure with an aim (${figures.filter((f) => f.aim !== undefined).length}) meets it`,
);
console.log(`report written to ${path.relative(process.cwd(), out)}`);

const { closeDb } = await import("../../app/.server/db");
await closeDb();
fs.rmSync(dir, { recursive: true, force: true });
