import { createContext, useContext } from "react";

/**
 * The Content-Security-Policy nonce of the response being rendered (set by app/entry.server.tsx). React Router's
 * inline scripts carry it; in the browser it is empty, as browsers hide nonces from the page after load.
 */
export const NonceContext = createContext<string | undefined>(undefined);
export const useNonce = () => useContext(NonceContext);
