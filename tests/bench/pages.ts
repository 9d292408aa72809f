import fs from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { createRequestHandler, type ServerBuild } from "react-router";
import { startSignIn } from "~/.server/auth";
import type { User } from "~/.server/models";
import { buildIfNeeded } from "../../scripts/build-if-needed";

/**
 * Whole pages through the built server (built first when a source is newer than the build, as `npm start` does):
 * loaders of every matching route and the HTML rendering, without the network. The build reaches the same database
 * file through its own connection.
 */
let handler: ((request: Request) => Promise<Response>) | null | undefined;

export async function pageHandler(): Promise<((request: Request) => Promise<Response>) | null> {
  if (handler !== undefined) return handler;
  const file = path.resolve("build/server/index.js");
  try {
    buildIfNeeded();
  } catch (err) {
    console.warn("[bench] the build failed:", err);
  }
  if (!fs.existsSync(file)) {
    console.warn("[bench] no build/server/index.js: run `npx react-router build` for the page figures");
    return (handler = null);
  }
  const build = (await import(pathToFileURL(file).href)) as ServerBuild;
  const handle = createRequestHandler(build, "production");
  return (handler = (request) => handle(request));
}

export const BASE = "http://localhost:3000";

/** A signed-in GET of `url` for `user`, returning the status and the body as text. */
export async function signedIn(user: User) {
  const cookie = (await startSignIn(user, new Request(BASE))).split(";")[0];
  const get = async (url: string) => {
    const h = await pageHandler();
    if (!h) throw new Error("no build");
    const res = await h(new Request(`${BASE}${url}`, { headers: { cookie, "sec-fetch-site": "same-origin" } }));
    const body = await res.text();
    if (res.status !== 200) throw new Error(`${url} answered ${res.status}: ${body.slice(0, 300)}`);
    return { status: res.status, body, bytes: Buffer.byteLength(body) };
  };
  return Object.assign(get, { cookie });
}
