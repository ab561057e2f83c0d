import { vehicleJson } from "~/lib/http/api-json.server";
import { vehicleSchema } from "~/lib/domain/vehicle-schema";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/api.v1.vehicles";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

const noStore = { "Cache-Control": "no-store" };

/** GET /api/v1/vehicles → { vehicles: [...] } (the caller's team, not archived; ?archived=1 for all). */
export const loader = apiRoute(async ({ request }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const archived = new URL(request.url).searchParams.get("archived") === "1";
  const rows = await vehicleData(teamId).list({ archived });
  return Response.json({ vehicles: rows.map(vehicleJson) }, { headers: noStore });
});

/** POST /api/v1/vehicles (JSON; engineer or admin) → 201 { vehicle }. */
export const action = apiRoute(async ({ request }: Route.ActionArgs) => {
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use GET or POST.");
  const { teamId } = await requireAccess(request, "engineer", { from: "api" });
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    return apiError(
      400,
      "bad_json",
      'Send a JSON object, e.g. {"name": "Test car", "identifier": "KST-09", "cylinders": 4, "stroke": 4}.',
    );
  }
  const parsed = vehicleSchema.safeParse(body);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    return apiError(
      400,
      "invalid_vehicle",
      `${issue?.path.join(".") || "body"}: ${issue?.message ?? "invalid"}`,
    );
  }
  const data = vehicleData(teamId);
  if (await data.identifierTaken(parsed.data.identifier)) {
    return apiError(
      409,
      "identifier_taken",
      `The team already has a vehicle with the identifier ${parsed.data.identifier}.`,
    );
  }
  const id = await data.create(parsed.data);
  const vehicle = await data.vehicle(id);
  return Response.json({ vehicle: vehicleJson(vehicle) }, { status: 201, headers: noStore });
});
