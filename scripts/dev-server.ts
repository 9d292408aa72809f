import { createRequestHandler } from "@react-router/express";
import express from "express";
import type { ServerBuild } from "react-router";
import { env } from "../app/.server/env";
import { securityHeaders } from "../app/.server/security/headers";
import { crossSiteGuard, loadContextFor } from "./server";

/** Vite in middleware mode with hot reload, in the same process as the fakes so the dev outbox sees caught mail. */
export async function createDevServer() {
  const vite = await import("vite").then((v) => v.createServer({ server: { middlewareMode: true } }));
  const app = express();
  app.use(securityHeaders({ appUrl: env().appUrl, csp: false }));
  app.use(crossSiteGuard);
  app.use(vite.middlewares);
  const build = () => vite.ssrLoadModule("virtual:react-router/server-build") as Promise<ServerBuild>;
  app.all("*", createRequestHandler({ build, getLoadContext: loadContextFor(build) }));
  return app;
}
