import { apiTokenOf, createTestTeam } from "./accounts";
import { startServer } from "./processes";

/**
 * What the end-to-end upload tests start from: the production server with `serverEnv`, a team
 * of its own, API tokens of its engineer and technician, and one vehicle. Import this module
 * after useJobTestbed() (it opens the database client).
 */
export async function startUploadBed(
  label: string,
  serverEnv: Record<string, string>,
  vehicle: { name: string; identifier: string },
) {
  const [server, team] = await Promise.all([startServer(serverEnv), createTestTeam(label)]);
  const engineerToken = await apiTokenOf(team, "engineer", `${label} engineer`);
  const technicianToken = await apiTokenOf(team, "technician", `${label} technician`);
  const r = await fetch(`${server.url}/api/v1/vehicles`, {
    method: "POST",
    headers: { Authorization: `Bearer ${engineerToken}`, "Content-Type": "application/json" },
    body: JSON.stringify({ ...vehicle, cylinders: 4, stroke: 4 }),
  });
  if (r.status !== 201) throw new Error(`creating the test vehicle answered ${r.status}`);
  const vehicleId = ((await r.json()) as { vehicle: { id: number } }).vehicle.id;
  /** The technician's API upload of one file to the vehicle: the server's raw answer. */
  const upload = (file: Blob, name: string, condition = "idle-neutral") => {
    const form = new FormData();
    form.set("file", file, name);
    form.set("condition", condition);
    return fetch(`${server.url}/api/v1/vehicles/${vehicleId}/logs`, {
      method: "POST",
      headers: { Authorization: `Bearer ${technicianToken}` },
      body: form,
    });
  };
  return { server, team, engineerToken, technicianToken, vehicleId, upload };
}
