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
    route("vehicles/:vehicleId/logs/:logId/rattle", "routes/rattle.tsx"),
    route("vehicles/:vehicleId/compare", "routes/compare.tsx"),
    // Sign-off (issue 16): propose, and one sign-off with its evidence, history and decisions.
    route("vehicles/:vehicleId/signoffs/new", "routes/signoff.new.tsx"),
    route("vehicles/:vehicleId/signoffs/:signoffId", "routes/signoff.tsx"),
    route("comparisons", "routes/comparisons.tsx"),
    route("team", "routes/team.tsx"),
    route("team/members/:memberId", "routes/team.member.tsx"),
    route("team/audit", "routes/team.audit.tsx"),
    route("account", "routes/account.tsx"),
    route("account/tokens", "routes/account.tokens.tsx"),
    route("outbox", "routes/outbox.tsx"),
    // Any other address: our own 404 page in the app's frame (/api/v1/* has its own, in JSON).
    route("*", "routes/not-found.tsx"),
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
  route(
    "vehicles/:vehicleId/logs/:logId/channel-preview.json",
    "routes/drive-log.channel-preview.ts",
  ),
  route("vehicles/:vehicleId/logs/:logId/result.csv", "routes/drive-log.result-csv.ts"),
  // Isolation and firing-order curves of several drive logs, for overlays.
  route("vehicles/:vehicleId/curves.json", "routes/vehicle.curves.ts"),
  // The vehicle page's "re-analyse all" panel posts here (issue 17).
  route("vehicles/:vehicleId/reanalyse", "routes/vehicle.reanalyse.ts"),
  // Resource routes (no component). The API answers JSON, errors as { error: { code, message } }.
  route("healthz", "routes/healthz.ts"),
  ...prefix("api/v1", [
    route("me", "routes/api.v1.me.ts"),
    route("vehicles", "routes/api.v1.vehicles.ts"),
    route("vehicles/:vehicleId", "routes/api.v1.vehicle.ts"),
    route("vehicles/:vehicleId/logs", "routes/api.v1.vehicle-logs.ts"),
    route("vehicles/:vehicleId/trend", "routes/api.v1.vehicle-trend.ts"),
    // Sign-off, evidence report and export pack (issue 16)
    route("vehicles/:vehicleId/signoffs", "routes/api.v1.vehicle-signoffs.ts"),
    route("vehicles/:vehicleId/report.pdf", "routes/api.v1.vehicle-report.ts"),
    route("vehicles/:vehicleId/export.zip", "routes/api.v1.vehicle-export.ts"),
    // Re-analyse all of a vehicle's drive logs, and the batch's progress (issue 17)
    route("vehicles/:vehicleId/reanalyse", "routes/api.v1.vehicle-reanalyse.ts"),
    route("vehicles/:vehicleId/reanalyse/:batchId", "routes/api.v1.vehicle-reanalyse-batch.ts"),
    route("signoffs", "routes/api.v1.signoffs.ts"),
    route("signoffs/:signoffId", "routes/api.v1.signoff.ts"),
    route("signoffs/:signoffId/report.pdf", "routes/api.v1.signoff-report.ts"),
    // approve, reject, withdraw
    route("signoffs/:signoffId/:step", "routes/api.v1.signoff-step.ts"),
    route("logs/:logId", "routes/api.v1.log.ts"),
    route("logs/:logId/result", "routes/api.v1.log-result.ts"),
    route("logs/:logId/channels", "routes/api.v1.log-channels.ts"),
    // Share links (issue 7)
    route("logs/:logId/shares", "routes/api.v1.log-shares.ts"),
    route("shares", "routes/api.v1.shares.ts"),
    route("shares/:shareId", "routes/api.v1.share.ts"),
    route("*", "routes/api.v1.not-found.ts"),
  ]),
  // Share links (issue 7): the read-only shared page in its own frame (outside _shell, no
  // sign-in) with its JSON, and the share panel's and the comments' resource routes.
  route("s/:token", "routes/share.tsx"),
  route("s/:token/charts.json", "routes/share.charts.ts"),
  route("s/:token/curves.json", "routes/share.curves.ts"),
  route("s/:token/file", "routes/share.file.ts"),
  route("s/:token/report.pdf", "routes/share.report.ts"),
  route("vehicles/:vehicleId/logs/:logId/share", "routes/drive-log.share.ts"),
  route("vehicles/:vehicleId/compare/share", "routes/comparison.share.ts"),
  route("vehicles/:vehicleId/signoffs/:signoffId/share", "routes/signoff.share.ts"),
  route("vehicles/:vehicleId/comments", "routes/comments.ts"),
] satisfies RouteConfig;
