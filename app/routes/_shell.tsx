import { Outlet } from "react-router";
import { AppHeader } from "~/components/app-header";

export default function Shell() {
  return (
    <div className="flex min-h-full flex-col">
      <AppHeader />
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
