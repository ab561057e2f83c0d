import { Link, Outlet } from "react-router";
import { LogoMark } from "~/components/logo-mark";
import { mainProps, SkipLink } from "~/components/skip-link";

/** The frame of the signed-out pages: sign-in, password reset, accepting an invitation. */
export default function AuthLayout() {
  return (
    <div className="flex min-h-full flex-col items-center justify-center px-4 py-12 sm:px-6">
      <SkipLink />
      <Link to="/" className="mb-8 flex items-center gap-2 text-xl font-semibold tracking-tight">
        <LogoMark />
        Twistlog
      </Link>
      <main
        {...mainProps}
        className="w-full max-w-sm rounded-lg border border-neutral-200 bg-white p-6 shadow-sm outline-none sm:p-8"
      >
        <Outlet />
      </main>
    </div>
  );
}
