/**
 * What the cluster tests share: the fault drills of scripts/cluster.sh, a team with API tokens
 * made straight in the cluster's database, and small HTTP helpers for the public API.
 */
import { execFileSync } from "node:child_process";
import { openAsBlob } from "node:fs";
import { repoRoot } from "../support/processes";
import { clusterEnv, clusterPorts } from "./ports";
import { scriptEnv } from "./global-setup";

export const web = `http://127.0.0.1:${clusterPorts.web}`;
export const appUrl = (i: number) => `http://127.0.0.1:${clusterPorts.app(i)}`;

/** `npm run cluster -- ARGS` against the test cluster (kill-app, kill-node, start-node …). */
export function clusterCommand(...args: string[]): string {
  return execFileSync("bash", ["scripts/cluster.sh", ...args], {
    cwd: repoRoot,
    env: { ...process.env, ...clusterEnv(), ...scriptEnv() },
    encoding: "utf8",
    timeout: 300_000,
  });
}

/** A new team with an API token for its technician and its engineer, and one vehicle. */
export async function clusterTeam(label: string) {
  const { apiTokenOf, createTestTeam } = await import("../support/accounts");
  const { vehicleData } = await import("~/lib/data/vehicles.server");
  const { vehicleSchema } = await import("~/lib/domain/vehicle-schema");
  const team = await createTestTeam(label);
  const vehicleId = await vehicleData(team.id).create(
    vehicleSchema.parse({ name: `${label} car`, identifier: "KST-C1", cylinders: 4, stroke: 4 }),
  );
  return {
    team,
    vehicleId,
    technician: await apiTokenOf(team, "technician", `${label} technician`),
    engineer: await apiTokenOf(team, "engineer", `${label} engineer`),
  };
}

export async function apiJson<T>(
  base: string,
  path: string,
  token: string,
  init: RequestInit = {},
) {
  const r = await fetch(base + path, {
    ...init,
    headers: { Authorization: `Bearer ${token}`, ...(init.headers ?? {}) },
  });
  // A load balancer's own error page (502/503) is HTML: then the body is null.
  const json = r.headers.get("content-type")?.includes("json");
  const text = await r.text();
  return { status: r.status, body: (json && text ? JSON.parse(text) : null) as T };
}

/** POST /api/v1/vehicles/:vehicleId/logs with one file (a path on disk or a Blob) by API token. */
export async function uploadLog(
  base: string,
  upload: { vehicleId: number; token: string; condition: string },
  file: string | Blob,
  name: string,
) {
  const form = new FormData();
  form.set("condition", upload.condition);
  form.set(
    "file",
    typeof file === "string" ? await openAsBlob(file, { type: "text/csv" }) : file,
    name,
  );
  return apiJson<{ log: { id: number } }>(
    base,
    `/api/v1/vehicles/${upload.vehicleId}/logs`,
    upload.token,
    {
      method: "POST",
      body: form,
    },
  );
}

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
