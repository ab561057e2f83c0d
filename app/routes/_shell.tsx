import { Outlet, useLoaderData } from "react-router";
import { AppHeader } from "~/components/app-header";
import { mainProps, SkipLink } from "~/components/skip-link";
import { usingFakeMail } from "~/lib/infra/mail.server";
import type { Route } from "./+types/_shell";
import { getCurrentUser } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";

/** The header needs to know who is signed in; pages check permissions themselves. */
export const loader = pageRoute(async ({ request }: Route.LoaderArgs) => {
  const current = await getCurrentUser(request);
  if (!current) return { user: null };
  return {
    user: {
      name: current.user.name,
      email: current.user.email,
      team: current.team,
      teams: current.teams,
      fakeMail: usingFakeMail(),
    },
  };
});

export default function Shell() {
  const { user } = useLoaderData<typeof loader>();
  return (
    <div className="flex min-h-full flex-col">
      <SkipLink />
      <AppHeader user={user} />
      {/* The one <main> of every signed-in page (pages render their content without one). */}
      <main
        {...mainProps}
        className="mx-auto w-full max-w-[1400px] flex-1 px-4 py-6 outline-none sm:px-6 sm:py-10"
      >
        <Outlet />
      </main>
      <footer className="border-t border-neutral-200 bg-white">
        <p className="mx-auto max-w-[1400px] px-4 py-4 text-xs text-neutral-500 sm:px-6">
          Road tests belong on a proving ground or closed course, driven by trained staff under
          local rules; never operate Twistlog while driving. Keep sensor wiring clear of rotating
          parts. Damper and clutch work is for licensed workshops. Local codes and licensed practice
          come first.
        </p>
      </footer>
    </div>
  );
}
