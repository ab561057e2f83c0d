import { isRouteErrorResponse, useRouteError } from "react-router";

const friendly: Record<number, { title: string; hint: string }> = {
  400: { title: "That request could not be read", hint: "Check the form and try again." },
  401: { title: "Please sign in", hint: "Your session has ended or you are not signed in." },
  403: { title: "Not allowed", hint: "Your role in this team does not allow this. Ask an admin." },
  404: {
    title: "Not found",
    hint: "The page or record does not exist, or it is not in your team.",
  },
  410: { title: "This link no longer works", hint: "It was used already or it has expired." },
  429: { title: "Too many attempts", hint: "Wait a few minutes and try again." },
  503: {
    title: "Temporarily unavailable",
    hint: "The service is starting or the database is down. Try again in a minute.",
  },
};

/**
 * The one error boundary every route shares: a friendly message; stack traces only in development.
 * Inside the shell it sits in the shell's <main>; root.tsx gives it a frame of its own.
 */
export function GeneralErrorBoundary() {
  const error = useRouteError();
  let status = 500;
  let detail: string | undefined;
  if (isRouteErrorResponse(error)) {
    status = error.status;
    // The router's own answers (e.g. 405 'Error: You made a POST request to …') are for
    // developers: readers get the friendly text; our refusals' messages are shown.
    const internal = "internal" in error && (error as { internal?: boolean }).internal === true;
    detail = typeof error.data === "string" && !internal ? error.data : undefined;
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.stack;
  }
  const text = friendly[status] ?? {
    title: "Something went wrong",
    hint: "The error has been logged. Try again, and tell an admin if it keeps happening.",
  };
  return (
    <div className="mx-auto max-w-2xl px-6 py-24" role="alert">
      <p className="text-sm font-semibold text-neutral-500">Error {status}</p>
      <h1 className="mt-2 text-2xl font-semibold">{text.title}</h1>
      <p className="mt-3 text-neutral-700">{detail && status < 500 ? detail : text.hint}</p>
      {import.meta.env.DEV && status >= 500 && detail ? (
        <pre className="mt-6 overflow-auto rounded bg-neutral-900 p-4 text-xs text-neutral-100">
          {detail}
        </pre>
      ) : null}
      <a href="/" className="mt-8 inline-block text-indigo-700 underline underline-offset-4">
        Back to the start page
      </a>
    </div>
  );
}
