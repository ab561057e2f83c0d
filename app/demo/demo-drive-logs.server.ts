import { createReadStream } from "node:fs";
import { fileURLToPath } from "node:url";
import { and, eq } from "drizzle-orm";
import type { LogMetadata, VehicleInput } from "~/lib/domain/vehicle-schema";
import { vehicleSchema } from "~/lib/domain/vehicle-schema";
import { blobStore } from "~/lib/infra/storage-settings.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import { recordDriveLog } from "~/lib/data/drive-log-intake.server";
import { db } from "~/lib/infra/db.server";
import { driveLogs, vehicles } from "../lib/infra/db/schema-drive-logs";
import { teams } from "../lib/infra/db/schema";

/**
 * The demo vehicles of the invented Kestrel programme and their sample drive logs
 * (samples/README.md: demo data, not test truth). The logs take the same path as an upload —
 * into storage by content hash, a drive-log row and a queued analysis — so a new user sees
 * analysed results a few seconds after `npm start`. Idempotent.
 */
const samplesDir = fileURLToPath(new URL("../../samples/", import.meta.url));

const DEMO_VEHICLES: {
  vehicle: Partial<VehicleInput> & Pick<VehicleInput, "name" | "identifier">;
  logs: { file: string; meta: LogMetadata }[];
}[] = [
  {
    vehicle: {
      name: "Kestrel estate 2.0 diesel",
      identifier: "KST-D4",
      cylinders: 4,
      stroke: 4,
      fuel: "diesel",
      idleRpm: 800,
      transmissionType: "manual",
      gearRatios: [3.82, 2.05, 1.3, 0.95, 0.76, 0.63],
      damperType: "dual-mass-flywheel",
      damperVariant: "A",
      primaryInertiaKgM2: 0.16,
      secondaryInertiaKgM2: 0.07,
      springRateNmPerDeg: 8,
      // A demo value of the invented Kestrel programme, plausible for an arc-spring flywheel.
      damperTravelLimitDeg: 60,
      notes:
        "Demo vehicle of the invented Kestrel programme. Damper B is the softer arc-spring variant.",
    },
    logs: [
      {
        file: "kestrel-kst-d4-idle-neutral-damper-a.csv",
        meta: {
          condition: "idle-neutral",
          gear: 0,
          damperVariant: "A",
          testDate: "2026-11-03",
          notes: "Warm engine, A/C off.",
        },
      },
      {
        file: "kestrel-kst-d4-engine-start-damper-a.csv",
        meta: {
          condition: "start-stop",
          gear: 0,
          damperVariant: "A",
          testDate: "2026-11-03",
          notes: "Key start, idle, key off.",
        },
      },
      {
        file: "kestrel-kst-d4-runup-3rd-full-load-damper-a.csv",
        meta: {
          condition: "run-up",
          gear: 3,
          damperVariant: "A",
          testDate: "2026-11-04",
          notes: "Full load from 1100 rpm.",
        },
      },
      {
        file: "kestrel-kst-d4-runup-3rd-full-load-damper-b.csv",
        meta: {
          condition: "run-up",
          gear: 3,
          damperVariant: "B",
          testDate: "2026-11-18",
          notes: "Same schedule after the damper change.",
        },
      },
    ],
  },
  {
    vehicle: {
      name: "Kestrel hatch 1.0 petrol",
      identifier: "KST-P3",
      cylinders: 3,
      stroke: 4,
      fuel: "petrol",
      idleRpm: 850,
      transmissionType: "manual",
      gearRatios: [3.55, 1.96, 1.28, 0.95, 0.76],
      damperType: "dual-mass-flywheel",
      damperVariant: "A",
      primaryInertiaKgM2: 0.12,
      secondaryInertiaKgM2: 0.06,
      springRateNmPerDeg: 6,
      // A demo value of the invented Kestrel programme.
      damperTravelLimitDeg: 55,
      notes: "Demo vehicle of the invented Kestrel programme.",
    },
    logs: [
      {
        file: "kestrel-kst-p3-idle-neutral-damper-a.csv",
        meta: {
          condition: "idle-neutral",
          gear: 0,
          damperVariant: "A",
          testDate: "2026-11-05",
          notes: "",
        },
      },
      {
        file: "kestrel-kst-p3-engine-start-damper-a.csv",
        meta: {
          condition: "start-stop",
          gear: 0,
          damperVariant: "A",
          testDate: "2026-11-05",
          notes: "",
        },
      },
      {
        file: "kestrel-kst-p3-runup-3rd-full-load-damper-a.csv",
        meta: {
          condition: "run-up",
          gear: 3,
          damperVariant: "A",
          testDate: "2026-11-06",
          notes: "",
        },
      },
      {
        file: "kestrel-kst-p3-runup-3rd-full-load-damper-b.csv",
        meta: {
          condition: "run-up",
          gear: 3,
          damperVariant: "B",
          testDate: "2026-11-19",
          notes: "",
        },
      },
    ],
  },
];

/** Adds what is missing to the team with `teamSlug`; returns how many rows it added. */
export async function seedDemoDriveLogs(teamSlug: string): Promise<number> {
  const [team] = await db.select({ id: teams.id }).from(teams).where(eq(teams.slug, teamSlug));
  if (!team) return 0;
  const data = vehicleData(team.id);
  let added = 0;
  for (const demo of DEMO_VEHICLES) {
    let [row] = await db
      .select({ id: vehicles.id, travel: vehicles.damperTravelLimitDeg })
      .from(vehicles)
      .where(and(eq(vehicles.teamId, team.id), eq(vehicles.identifier, demo.vehicle.identifier)));
    if (!row) {
      row = { id: await data.create(vehicleSchema.parse(demo.vehicle)), travel: null };
      added++;
    } else if (row.travel === null && demo.vehicle.damperTravelLimitDeg !== undefined) {
      // Demo vehicles seeded before the field existed (issue 15) get it too.
      await db
        .update(vehicles)
        .set({ damperTravelLimitDeg: demo.vehicle.damperTravelLimitDeg })
        .where(eq(vehicles.id, row.id));
    }
    const vehicle = await data.vehicle(row.id);
    for (const log of demo.logs) {
      const stored = await blobStore().put(createReadStream(samplesDir + log.file));
      const existing = await db
        .select({ id: driveLogs.id })
        .from(driveLogs)
        .where(and(eq(driveLogs.vehicleId, vehicle.id), eq(driveLogs.blobKey, stored.key)));
      if (existing.length > 0) continue;
      // Queued for analysis like an upload (the server's runner takes them when it starts).
      await recordDriveLog(team.id, {
        vehicle,
        fileName: log.file,
        stored,
        metadata: log.meta,
        uploadedBy: null,
      });
      added++;
    }
  }
  return added;
}
