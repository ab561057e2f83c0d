import { Form, Link, NavLink } from "react-router";
import { atLeast, roleLabels, type Role } from "~/lib/domain/roles";
import { CsrfInput } from "./csrf-input";
import { LogoMark } from "./logo-mark";

const areas = [
  { to: "/vehicles", label: "Vehicles" },
  { to: "/comparisons", label: "Comparisons" },
  { to: "/team", label: "Team" },
];

interface TeamChoice {
  id: number;
  name: string;
  role: Role;
}

export interface HeaderUser {
  name: string;
  email: string;
  team: TeamChoice | null;
  teams: TeamChoice[];
  fakeMail: boolean;
}

export function AppHeader({ user }: { user: HeaderUser | null }) {
  return (
    <header className="border-b border-neutral-200 bg-white">
      {/* Below md the main areas drop to a second row, so nothing overflows a phone or a tablet in portrait. */}
      <div className="mx-auto flex min-h-14 max-w-[1400px] flex-wrap items-center gap-x-6 gap-y-1 px-4 py-2 sm:px-6 md:py-0">
        <Link to="/" className="flex items-center gap-2 text-lg font-semibold tracking-tight">
          <LogoMark />
          Twistlog
        </Link>
        {user?.team ? <TeamSwitcher current={user.team} teams={user.teams} /> : null}
        <nav
          aria-label="Main"
          className="order-last -mx-3 flex w-full gap-1 overflow-x-auto text-sm md:order-none md:mx-0 md:w-auto"
        >
          {areas.map((area) => (
            <NavLink
              key={area.to}
              to={area.to}
              className={({ isActive }) =>
                `rounded-md px-3 py-1.5 font-medium ${
                  isActive
                    ? "bg-neutral-100 text-neutral-900"
                    : "text-neutral-600 hover:text-neutral-900"
                }`
              }
            >
              {area.label}
            </NavLink>
          ))}
        </nav>
        <div className="ml-auto">
          {user ? (
            <UserMenu user={user} />
          ) : (
            <Link
              to="/sign-in"
              className="rounded-md bg-indigo-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-indigo-700"
            >
              Sign in
            </Link>
          )}
        </div>
      </div>
    </header>
  );
}

const menuPanel =
  "absolute z-10 mt-2 min-w-56 rounded-md border border-neutral-200 bg-white p-1 shadow-lg";
const menuItem =
  "block w-full rounded px-3 py-2 text-left text-sm text-neutral-700 hover:bg-neutral-100 focus-visible:bg-neutral-100";

/** One team shown as a label; several as a menu of buttons that post to /team/switch. */
function TeamSwitcher({ current, teams }: { current: TeamChoice; teams: TeamChoice[] }) {
  if (teams.length < 2) {
    return <span className="text-sm font-medium text-neutral-700">{current.name}</span>;
  }
  return (
    <details className="relative">
      <summary className="cursor-pointer list-none rounded-md border border-neutral-300 px-3 py-1.5 text-sm font-medium text-neutral-800 hover:bg-neutral-50">
        <span className="sr-only">Team: </span>
        {current.name} <span aria-hidden="true">▾</span>
      </summary>
      <Form method="post" action="/team/switch" className={menuPanel}>
        <CsrfInput />
        <p className="px-3 py-1 text-xs font-medium text-neutral-500">Switch team</p>
        {teams.map((t) => (
          <button
            key={t.id}
            type="submit"
            name="teamId"
            value={t.id}
            aria-current={t.id === current.id ? "true" : undefined}
            className={`${menuItem} whitespace-nowrap ${t.id === current.id ? "font-semibold text-neutral-900" : ""}`}
          >
            {t.name} <span className="text-xs text-neutral-500">· {roleLabels[t.role]}</span>
          </button>
        ))}
      </Form>
    </details>
  );
}

function UserMenu({ user }: { user: HeaderUser }) {
  const admin = user.team && atLeast(user.team.role, "admin");
  return (
    <details className="relative">
      <summary className="flex cursor-pointer list-none items-center gap-2 rounded-md px-2 py-1.5 text-sm hover:bg-neutral-100">
        <span className="max-w-40 truncate font-medium text-neutral-800">{user.name}</span>
        {user.team ? (
          <span className="rounded bg-indigo-50 px-1.5 py-0.5 text-xs font-medium text-indigo-800">
            {roleLabels[user.team.role]}
          </span>
        ) : null}
        <span aria-hidden="true">▾</span>
      </summary>
      <div className={`${menuPanel} right-0`}>
        <p className="truncate px-3 py-1 text-xs text-neutral-500">{user.email}</p>
        <Link to="/account" className={menuItem}>
          Account and sessions
        </Link>
        <Link to="/account/tokens" className={menuItem}>
          API tokens
        </Link>
        {admin ? (
          <Link to="/team/audit" className={menuItem}>
            Audit log
          </Link>
        ) : null}
        {admin && user.fakeMail ? (
          <Link to="/outbox" className={menuItem}>
            Outbox (local mail)
          </Link>
        ) : null}
        <Form method="post" action="/sign-out">
          <CsrfInput />
          <button type="submit" className={menuItem}>
            Sign out
          </button>
        </Form>
      </div>
    </details>
  );
}
