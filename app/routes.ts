import { type RouteConfig, index, layout, prefix, route } from "@react-router/dev/routes";

// The one table of every URL in the app (docs/decisions/001-route-table.md).
export default [
  layout("routes/_shell.tsx", [
    index("routes/home.tsx"),
    route("vehicles", "routes/vehicles.tsx"),
    route("vehicles/new", "routes/vehicles.new.tsx"),
    route("vehicles/:vehicleId", "routes/vehicle.tsx"),
    route("vehicles/:vehicleId/edit", "routes/vehicle.edit.tsx"),
    route("vehicles/:vehicleId/logs/:logId", "routes/drive-log.tsx"),
    route("comparisons", "routes/comparisons.tsx"),
    route("team", "routes/team.tsx"),
    route("team/members/:memberId", "routes/team.member.tsx"),
    route("team/audit", "routes/team.audit.tsx"),
    route("account", "routes/account.tsx"),
    route("account/tokens", "routes/account.tokens.tsx"),
    route("outbox", "routes/outbox.tsx"),
  ]),
  // Signed-out pages in a small centred frame.
  layout("routes/_auth.tsx", [
    route("sign-in", "routes/sign-in.tsx"),
    route("forgot-password", "routes/forgot-password.tsx"),
    route("reset-password/:token", "routes/reset-password.tsx"),
    route("invitations/:token", "routes/accept-invitation.tsx"),
  ]),
  // Form posts without a page of their own.
  route("sign-out", "routes/sign-out.ts"),
  route("team/switch", "routes/team-switch.ts"),
  // The vehicle page polls this while analyses run; the drive-log page links the raw file.
  route("vehicles/:vehicleId/status", "routes/vehicle.status.ts"),
  route("vehicles/:vehicleId/logs/:logId/file", "routes/drive-log.file.ts"),
  // Chart data (JSON) for the drive-log and rattle-check pages, fetched with TanStack Query.
  route("vehicles/:vehicleId/logs/:logId/charts.json", "routes/drive-log.charts.ts"),
  // Isolation and firing-order curves of several drive logs, for overlays.
  route("vehicles/:vehicleId/curves.json", "routes/vehicle.curves.ts"),
  // Resource routes (no component). The API answers JSON, errors as { error: { code, message } }.
  route("healthz", "routes/healthz.ts"),
  ...prefix("api/v1", [
    route("me", "routes/api.v1.me.ts"),
    route("vehicles", "routes/api.v1.vehicles.ts"),
    route("vehicles/:vehicleId", "routes/api.v1.vehicle.ts"),
    route("vehicles/:vehicleId/logs", "routes/api.v1.vehicle-logs.ts"),
    route("logs/:logId", "routes/api.v1.log.ts"),
    route("logs/:logId/result", "routes/api.v1.log-result.ts"),
    route("*", "routes/api.v1.not-found.ts"),
  ]),
] satisfies RouteConfig;
