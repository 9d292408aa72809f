import { PassThrough } from "node:stream";
import { createReadableStreamFromReadable } from "@react-router/node";
import { isbot } from "isbot";
import { renderToPipeableStream } from "react-dom/server";
import { ServerRouter, type EntryContext, type RouterContextProvider } from "react-router";
import { cspNonceContext } from "./.server/security/load-context";
import { NonceContext } from "./lib/nonce";

// The HTTP server builds each request's context through the build, so the context keys are the routes' own.
export { requestContext } from "./.server/security/load-context";

export const streamTimeout = 5_000;

/**
 * React Router's default document renderer, plus the CSP nonce: scripts/server.ts makes one per response, puts it in
 * the Content-Security-Policy header and in the load context, and every inline script React and React Router write
 * (hydration data, module loader, scroll restoration, streamed boundaries) carries it.
 */
export default function handleRequest(
  request: Request,
  responseStatusCode: number,
  responseHeaders: Headers,
  routerContext: EntryContext,
  loadContext: RouterContextProvider,
) {
  if (request.method.toUpperCase() === "HEAD")
    return new Response(null, { status: responseStatusCode, headers: responseHeaders });
  const nonce = loadContext.get(cspNonceContext) ?? undefined;

  return new Promise<Response>((resolve, reject) => {
    let shellRendered = false;
    const userAgent = request.headers.get("user-agent");
    // Crawlers and SPA mode wait for all content; people get the shell as soon as it is ready.
    const readyOption = (userAgent && isbot(userAgent)) || routerContext.isSpaMode ? "onAllReady" : "onShellReady";
    let timeoutId: ReturnType<typeof setTimeout> | undefined = setTimeout(() => abort(), streamTimeout + 1000);

    const { pipe, abort } = renderToPipeableStream(
      <NonceContext.Provider value={nonce}>
        <ServerRouter context={routerContext} url={request.url} nonce={nonce} />
      </NonceContext.Provider>,
      {
        nonce,
        [readyOption]() {
          shellRendered = true;
          const body = new PassThrough({
            final(callback) {
              clearTimeout(timeoutId);
              timeoutId = undefined;
              callback();
            },
          });
          const stream = createReadableStreamFromReadable(body);
          responseHeaders.set("Content-Type", "text/html");
          pipe(body);
          resolve(new Response(stream, { headers: responseHeaders, status: responseStatusCode }));
        },
        onShellError(error: unknown) {
          reject(error);
        },
        onError(error: unknown) {
          responseStatusCode = 500;
          // Errors while rendering the shell are logged by React Router itself.
          if (shellRendered) console.error(error);
        },
      },
    );
  });
}
