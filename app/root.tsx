import "@fontsource/inter/400.css";
import "@fontsource/inter/500.css";
import "@fontsource/inter/600.css";
import "@fontsource/inter/700.css";
import "./app.css";

import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { useState } from "react";
import { data, Links, Meta, Outlet, Scripts, ScrollRestoration } from "react-router";
import type { Route } from "./+types/root";
import { GeneralErrorBoundary } from "./components/error-boundary";
import { useNonce } from "./components/nonce";
import { mainProps, SkipLink } from "./components/skip-link";
import { issueCsrfToken } from "./lib/http/csrf.server";

/** Every page gets this browser's CSRF token for its forms (docs/decisions/005-csrf.md). */
export async function loader({ request }: Route.LoaderArgs) {
  const { token, setCookie } = await issueCsrfToken(request);
  return data(
    { csrfToken: token },
    setCookie ? { headers: { "Set-Cookie": setCookie } } : undefined,
  );
}

export const links: Route.LinksFunction = () => [
  { rel: "icon", href: "/favicon.svg", type: "image/svg+xml" },
];

export const meta: Route.MetaFunction = () => [
  { title: "Twistlog" },
  { name: "description", content: "Torsional-vibration results for driveline NVH teams." },
];

export function Layout({ children }: { children: React.ReactNode }) {
  const nonce = useNonce();
  return (
    <html lang="en" className="h-full">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <Meta />
        <Links />
      </head>
      <body className="h-full bg-neutral-50 text-neutral-900 antialiased">
        {children}
        <ScrollRestoration nonce={nonce} />
        <Scripts nonce={nonce} />
      </body>
    </html>
  );
}

export default function App() {
  // One client per browser session; charts fetch their JSON through it.
  const [queryClient] = useState(
    () => new QueryClient({ defaultOptions: { queries: { staleTime: 30_000, retry: 1 } } }),
  );
  return (
    <QueryClientProvider client={queryClient}>
      <Outlet />
    </QueryClientProvider>
  );
}

/** Errors outside the shell (its loader, the sign-in frame): the same message in a frame of its own. */
export function ErrorBoundary() {
  return (
    <>
      <SkipLink />
      <main {...mainProps} className="outline-none">
        <GeneralErrorBoundary />
      </main>
    </>
  );
}
