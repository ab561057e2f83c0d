import { Link, Outlet } from "react-router";
import { LogoMark } from "~/components/logo-mark";

/** The frame of the signed-out pages: sign-in, password reset, accepting an invitation. */
export default function AuthLayout() {
  return (
    <div className="flex min-h-full flex-col items-center justify-center px-6 py-12">
      <Link to="/" className="mb-8 flex items-center gap-2 text-xl font-semibold tracking-tight">
        <LogoMark />
        Twistlog
      </Link>
      <main className="w-full max-w-sm rounded-lg border border-neutral-200 bg-white p-8 shadow-sm">
        <Outlet />
      </main>
    </div>
  );
}
