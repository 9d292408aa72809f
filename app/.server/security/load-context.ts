// What scripts/server.ts hands every loader and action besides the request.
declare module "react-router" {
  interface AppLoadContext {
    /** The client's address as the HTTP server saw it (for per-client rate limits). */
    clientAddress?: string;
    /** This response's Content-Security-Policy nonce for inline scripts. */
    cspNonce?: string;
  }
}
export {};
