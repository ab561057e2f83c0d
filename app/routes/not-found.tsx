import { data, Link, useLoaderData } from "react-router";
import { buttonLinkClass, linkClass } from "~/components/form-fields";
import type { Route } from "./+types/not-found";
import { getCurrentUser } from "~/lib/http/access.server";

/**
 * Every URL no other route matches (the last entry of app/routes.ts; /api/v1/ has its own JSON
 * answer): a 404 page in our own words with a way back, instead of the router's raw message.
 */
export const meta = () => [{ title: "Page not found · Twistlog" }];

async function notFound(request: Request) {
  const current = await getCurrentUser(request);
  const url = new URL(request.url);
  return data(
    {
      signedIn: current !== null,
      path: url.pathname,
      signIn: `/sign-in?redirectTo=${encodeURIComponent("/vehicles")}`,
    },
    { status: 404, headers: { "Cache-Control": "no-store" } },
  );
}

export const loader = ({ request }: Route.LoaderArgs) => notFound(request);
// A form posted to an unknown address is a 404 too, not "method not allowed".
export const action = ({ request }: Route.ActionArgs) => notFound(request);

export default function NotFound() {
  const { signedIn, path, signIn } = useLoaderData<typeof loader>();
  return (
    <main className="mx-auto max-w-2xl py-12" data-not-found>
      <p className="text-sm font-semibold text-neutral-500">Error 404</p>
      <h1 className="mt-2 text-2xl font-semibold">There is no page at this address</h1>
      <p className="mt-3 text-neutral-700">
        Nothing in Twistlog lives at <span className="font-mono break-all">{path}</span>. The link
        may be mistyped or out of date, or what it pointed to has been deleted.
      </p>
      <nav aria-label="Ways back" className="mt-8 flex flex-wrap items-center gap-4">
        <Link
          to="/vehicles"
          className={`${buttonLinkClass} bg-indigo-600 text-white hover:bg-indigo-700`}
        >
          Go to Vehicles
        </Link>
        <Link to="/" className={linkClass}>
          Start page
        </Link>
        {signedIn ? null : (
          <Link to={signIn} className={linkClass}>
            Sign in
          </Link>
        )}
      </nav>
    </main>
  );
}
