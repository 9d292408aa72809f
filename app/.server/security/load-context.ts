import { createContext, RouterContextProvider } from "react-router";

/** The client's address as the HTTP server saw it (for per-client rate limits); null when it gave none. */
export const clientAddressContext = createContext<string | null>(null);
/** This response's Content-Security-Policy nonce for inline scripts; null when the server sends no policy. */
export const cspNonceContext = createContext<string | null>(null);

/**
 * What every loader, action and the document renderer get besides the request (future.v8_middleware: a
 * RouterContextProvider, read with `context.get(…)`). The keys are compared by identity, and the server build holds
 * its own copy of this module, so scripts/server.ts builds the context through the build (entry.server.tsx
 * re-exports this function) rather than importing it from the source.
 */
export function requestContext(values: { clientAddress?: string; cspNonce?: string }): RouterContextProvider {
  const context = new RouterContextProvider();
  context.set(clientAddressContext, values.clientAddress ?? null);
  context.set(cspNonceContext, values.cspNonce ?? null);
  return context;
}
