import path from "node:path";
import { pathToFileURL } from "node:url";
import { createRequestHandler, type GetLoadContextFunction } from "@react-router/express";
import compression from "compression";
import express, { type RequestHandler } from "express";
import type { ServerBuild } from "react-router";
import { env } from "../app/.server/env";
import type { requestContext } from "../app/.server/security/load-context";
import { isCrossSiteWrite } from "../app/.server/http";
import { securityHeaders } from "../app/.server/security/headers";

/**
 * The production HTTP server: static assets from the client build, everything else through React Router.
 * Cross-site writes are refused here, before any route runs, so no action can forget the check.
 */
export async function createAppServer(buildDir = path.resolve("build")) {
  const build = (await import(pathToFileURL(path.join(buildDir, "server/index.js")).href)) as ServerBuild;
  const app = express();
  app.disable("x-powered-by");
  app.set("trust proxy", "loopback");
  // Headers first, so refusals and errors carry them too.
  app.use(securityHeaders({ appUrl: env().appUrl }));
  app.use(crossSiteGuard);
  // gzip or brotli, whichever the client prefers, for HTML, JSON, the feed, JS and CSS alike.
  app.use(compression({ threshold: 1024 }));
  app.use("/assets", express.static(path.join(buildDir, "client/assets"), { immutable: true, maxAge: "1y" }));
  app.use(express.static(path.join(buildDir, "client"), { maxAge: "1h", index: false }));
  app.all("*", createRequestHandler({ build, getLoadContext: loadContextFor(build) }));
  return app;
}

export const crossSiteGuard: RequestHandler = (req, res, next) => {
  const headers = {
    origin: req.get("origin"),
    referer: req.get("referer"),
    host: req.get("host"),
    secFetchSite: req.get("sec-fetch-site"),
    hasSessionCookie: /(?:^|;\s*)pw_session=/.test(req.get("cookie") ?? ""),
  };
  if (isCrossSiteWrite(req.method, headers, req.path, [new URL(env().appUrl).origin])) {
    res.status(403).type("text/plain").send("Refused: this request came from another site.");
    return;
  }
  next();
};

/**
 * What every loader and action gets besides the request: the client's address (for per-client limits) and the
 * response's CSP nonce. The context is made by the build's own `requestContext` (exported from entry.server.tsx):
 * its keys must be the ones the built routes read, not this process's copy of the source module.
 */
export function loadContextFor(build: ServerBuild | (() => Promise<ServerBuild>)): GetLoadContextFunction {
  return async (req, res) => {
    const entry = (typeof build === "function" ? await build() : build).entry.module as unknown as {
      requestContext: typeof requestContext;
    };
    return entry.requestContext({
      clientAddress: req.ip ?? req.socket.remoteAddress ?? undefined,
      cspNonce: res.locals.cspNonce as string | undefined,
    });
  };
}
