import { Link } from "react-router";

/** The sign-in pages' parts: a link under the form, and a page that only says something. */

/** The link under a sign-in page's form or note, e.g. "Back to sign-in". */
export function AuthLink({ to, children }: { to: string; children: React.ReactNode }) {
  return (
    <p className="mt-6 text-sm">
      <Link to={to} className="text-indigo-700 underline underline-offset-4">
        {children}
      </Link>
    </p>
  );
}

/**
 * A sign-in page that has no form to show (a link that no longer works, a mail on its way): the
 * title, what happened, and where to go next. `status` announces the message when it answers a post.
 */
export function AuthNote({
  title,
  status = false,
  link,
  children,
}: {
  title: string;
  status?: boolean;
  link: { to: string; label: string };
  children: React.ReactNode;
}) {
  return (
    <>
      <h1 className="text-xl font-semibold">{title}</h1>
      <p role={status ? "status" : undefined} className="mt-4 text-sm text-neutral-700">
        {children}
      </p>
      <AuthLink to={link.to}>{link.label}</AuthLink>
    </>
  );
}
