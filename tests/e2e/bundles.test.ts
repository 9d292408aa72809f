import fs from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";
import type { ServerBuild } from "react-router";
import { beforeAll, describe, expect, it } from "vitest";

/**
 * Route-level code splitting, read from the built app (`react-router build` runs before this project): the route
 * manifest lists, per route, every chunk the browser loads for it. Heavy modules must stay out of the chunks every
 * page loads (entry, root, signed-in layout) and out of routes that do not use them.
 */
const dir = path.resolve("build/client");
let assets: ServerBuild["assets"];
const text = new Map<string, string>();
const source = (file: string) => {
  if (!text.has(file)) text.set(file, fs.readFileSync(path.join(dir, file), "utf8"));
  return text.get(file)!;
};
const chunksOf = (...ids: string[]) => {
  const out = new Set<string>();
  for (const id of ids) {
    const r = id === "entry" ? assets.entry : assets.routes[id];
    if (!r) throw new Error(`no route ${id} in the manifest`);
    if (r.module) out.add(r.module);
    for (const f of r.imports ?? []) out.add(f);
  }
  return [...out];
};
// Literal strings each library keeps through minification: dnd-kit's live region and description ids, zod's issue code.
const holdsDndKit = (file: string) => /DndLiveRegion|DndDescribedBy/.test(source(file));
const holdsZod = (file: string) => source(file).includes("invalid_type");

// Pages that render a drag-and-drop component (the board, both calendars, the session builder).
const DRAG_AND_DROP = new Set([
  "routes/coach/board",
  "routes/athlete/calendar",
  "routes/coach/athlete-calendar",
  "routes/coach/session-edit",
  "session-new",
]);

describe("code splitting of the built app", () => {
  beforeAll(async () => {
    assets = ((await import(pathToFileURL(path.resolve("build/server/index.js")).href)) as ServerBuild).assets;
  });

  it("finds dnd-kit and zod in the build at all (so the checks below can fail)", () => {
    expect(chunksOf("routes/coach/board").filter(holdsDndKit).length).toBeGreaterThan(0);
    expect(chunksOf("routes/coach/plan-new").filter(holdsZod).length).toBeGreaterThan(0);
  });

  it("keeps dnd-kit and zod out of the chunks every page loads", () => {
    const everyPage = chunksOf("entry", "root", "routes/app-layout");
    expect(everyPage.filter(holdsDndKit)).toEqual([]);
    expect(everyPage.filter(holdsZod)).toEqual([]);
  });

  it("loads dnd-kit only on the pages with drag and drop, and the board without zod", () => {
    const offenders = Object.keys(assets.routes).filter(
      (id) => !DRAG_AND_DROP.has(id) && chunksOf(id).some(holdsDndKit),
    );
    expect(offenders).toEqual([]);
    expect(chunksOf("routes/coach/board").filter(holdsZod)).toEqual([]);
  });
});
