import { useRouteLoaderData } from "react-router";
import type { loader as rootLoader } from "~/root";

/** The hidden CSRF field every state-changing form carries (docs/decisions/005-csrf.md). */
export function CsrfInput() {
  const root = useRouteLoaderData<typeof rootLoader>("root");
  return <input type="hidden" name="csrf" value={root?.csrfToken ?? ""} />;
}
