import { createContext, useContext } from "react";

// The CSP nonce of this response, for <Scripts> and <ScrollRestoration>. Only the server knows
// it; in the browser it is "" (the scripts are already running, and browsers hide the value).
const NonceContext = createContext("");

export const NonceProvider = NonceContext.Provider;

export function useNonce(): string {
  return useContext(NonceContext);
}
