/**
 * The first focusable element of every frame (shell, sign-in frame, shared page): keyboard and
 * screen-reader users jump past the header to <main id="main">. Hidden until it has focus.
 */
export function SkipLink() {
  return (
    <a
      href="#main"
      className="sr-only rounded-md bg-white text-sm font-medium text-indigo-800 shadow-lg ring-2 ring-indigo-600 focus:not-sr-only focus:fixed focus:top-2 focus:left-2 focus:z-50 focus:px-3 focus:py-2"
    >
      Skip to main content
    </a>
  );
}

/** The target of the skip link; tabIndex -1 so the link's Enter moves focus here, not only the view. */
export const mainProps = { id: "main", tabIndex: -1 } as const;
