import { type RouteConfig, index, layout, route } from "@react-router/dev/routes";

// The one table of every URL in the app (docs/decisions/001-route-table.md).
export default [
  layout("routes/_shell.tsx", [
    index("routes/home.tsx"),
    route("vehicles", "routes/vehicles.tsx"),
    route("comparisons", "routes/comparisons.tsx"),
    route("team", "routes/team.tsx"),
  ]),
  // Resource routes (no component).
  route("healthz", "routes/healthz.ts"),
] satisfies RouteConfig;
