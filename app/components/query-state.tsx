import type { UseQueryResult } from "@tanstack/react-query";

/**
 * GET a JSON resource route for TanStack Query: the body when `has(body)` holds, else an Error
 * with the server's own message (`{ error: { message } }`) or, without one, "`what` could not be
 * loaded (status)".
 */
export async function fetchJson<T>(url: string, what: string, has: (body: T) => boolean) {
  const response = await fetch(url, { headers: { Accept: "application/json" } });
  const body = (await response.json().catch(() => null)) as
    (T & { error?: { message: string } }) | null;
  if (!response.ok || !body || !has(body))
    throw new Error(body?.error?.message ?? `${what} could not be loaded (${response.status}).`);
  return body;
}

/**
 * A query's three states: a grey placeholder of `height` while loading, the error with "Try
 * again", and `children(data)` once there.
 */
export function QueryState<T>({
  query,
  loadingLabel,
  height,
  onRetry,
  children,
}: {
  query: UseQueryResult<T>;
  loadingLabel: string;
  /** Tailwind height class of the placeholder, e.g. "h-16". */
  height: string;
  onRetry: () => void;
  children: (data: T) => React.ReactNode;
}) {
  if (query.isPending)
    return (
      <div
        className={`${height} animate-pulse rounded-md bg-neutral-100`}
        aria-label={loadingLabel}
      />
    );
  if (query.isError)
    return (
      <p role="alert" className="text-sm text-red-700">
        {query.error.message}{" "}
        <button type="button" className="underline" onClick={onRetry}>
          Try again
        </button>
      </p>
    );
  return <>{children(query.data)}</>;
}
