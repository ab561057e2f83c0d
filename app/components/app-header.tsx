import { NavLink } from "react-router";

const areas = [
  { to: "/vehicles", label: "Vehicles" },
  { to: "/comparisons", label: "Comparisons" },
  { to: "/team", label: "Team" },
];

export function AppHeader() {
  return (
    <header className="border-b border-neutral-200 bg-white">
      <div className="mx-auto flex h-14 max-w-[1400px] items-center gap-8 px-6">
        <a href="/" className="flex items-center gap-2 text-lg font-semibold tracking-tight">
          <LogoMark />
          Twistlog
        </a>
        <nav aria-label="Main" className="flex gap-1 text-sm">
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
      </div>
    </header>
  );
}

/** Two discs on one shaft, joined by a spring: our own mark. */
function LogoMark() {
  return (
    <svg width="22" height="22" viewBox="0 0 24 24" aria-hidden="true" className="text-indigo-600">
      <circle cx="6" cy="12" r="5" fill="currentColor" />
      <circle cx="18" cy="12" r="4" fill="none" stroke="currentColor" strokeWidth="2" />
      <path
        d="M10 12 l1.2 -2 l1.6 4 l1.6 -4 l1.2 2"
        fill="none"
        stroke="currentColor"
        strokeWidth="1.5"
      />
    </svg>
  );
}
