import { useEffect, useState } from "react";

/**
 * True after the first render in the browser. Before it (on the server, and without JavaScript)
 * components render their plain-form fallback, so every page works without scripts.
 */
export function useHydrated() {
  const [hydrated, setHydrated] = useState(false);
  useEffect(() => setHydrated(true), []);
  return hydrated;
}
