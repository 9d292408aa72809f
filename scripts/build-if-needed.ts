import { execFileSync, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";

function newestMtime(dir: string): number {
  let newest = 0;
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestMtime(full) : fs.statSync(full).mtimeMs);
  }
  return newest;
}

/**
 * Builds when there is no build yet or a source file is newer than it, so `npm start` never serves stale code.
 * The build's own output is shown with `verbose`, or when the build fails.
 */
export function buildIfNeeded({ verbose = false }: { verbose?: boolean } = {}) {
  const marker = path.resolve("build/server/index.js");
  const sources = ["app", "public"].map((d) => path.resolve(d));
  const configs = ["vite.config.ts", "react-router.config.ts", "package.json"].map((f) => fs.statSync(f).mtimeMs);
  const newestSource = Math.max(...sources.map(newestMtime), ...configs);
  if (fs.existsSync(marker) && fs.statSync(marker).mtimeMs >= newestSource) return false;
  console.log("Building the app (a minute or so the first time)…");
  const args = [path.resolve("node_modules/@react-router/dev/bin.js"), "build"];
  if (verbose) {
    execFileSync(process.execPath, args, { stdio: "inherit" });
    return true;
  }
  const result = spawnSync(process.execPath, args, { encoding: "utf8", env: { ...process.env, FORCE_COLOR: "0" } });
  if (result.status !== 0) {
    process.stderr.write(`${result.stdout ?? ""}${result.stderr ?? ""}`);
    throw new Error(`The build failed (exit code ${result.status ?? result.signal}); its output is above.`);
  }
  return true;
}
