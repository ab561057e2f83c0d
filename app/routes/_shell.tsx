import { Outlet, useLoaderData } from "react-router";
import { AppHeader } from "~/components/app-header";
import { usingFakeMail } from "~/lib/mail.server";
import { getCurrentUser } from "~/lib/permissions.server";
import type { Route } from "./+types/_shell";

/** The header needs to know who is signed in; pages check permissions themselves. */
export async function loader({ request }: Route.LoaderArgs) {
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
}

export default function Shell() {
  const { user } = useLoaderData<typeof loader>();
  return (
    <div className="flex min-h-full flex-col">
      <AppHeader user={user} />
      <div className="mx-auto w-full max-w-[1400px] flex-1 px-6 py-10">
        <Outlet />
      </div>
      <footer className="border-t border-neutral-200 bg-white">
        <p className="mx-auto max-w-[1400px] px-6 py-4 text-xs text-neutral-500">
          Road tests belong on a proving ground or closed course, driven by trained staff under
          local rules; never operate Twistlog while driving. Keep sensor wiring clear of rotating
          parts. Damper and clutch work is for licensed workshops. Local codes and licensed practice
          come first.
        </p>
      </footer>
    </div>
  );
}
