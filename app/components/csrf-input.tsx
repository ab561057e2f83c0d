import { useRouteLoaderData } from "react-router";

/** The hidden CSRF field every state-changing form carries (docs/decisions/005-csrf.md). */
export function CsrfInput() {
  // The root loader hands every page its token (app/root.tsx).
  const root = useRouteLoaderData<{ csrfToken?: string }>("root");
  return <input type="hidden" name="csrf" value={root?.csrfToken ?? ""} />;
}
