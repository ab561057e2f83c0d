import { gzipSync } from "node:zlib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { useScratchDatabase } from "../support/scratch-db";

// Issue 11 §3.2 and §3.3 against the real MariaDB: which drive log a comparison is measured
// against, on every way into it, and the pairs /comparisons suggests. Drive logs and their
// analyses are seeded as rows (no job runner), with flat isolation curves whose band means and
// difference are known by construction. A database of this file's own (tests/support/scratch-db.ts).
const scratch = await useScratchDatabase("compare");
const { db, pool } = await import("~/lib/infra/db.server");
const { analyses, driveLogs, isolationPoints } = await import("~/lib/infra/db/schema-drive-logs");
const { eq } = await import("drizzle-orm");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { vehicleSchema } = await import("~/lib/domain/vehicle-schema");
const { createShare } = await import("~/lib/data/shares.server");
const sharePage = await import("~/lib/http/share-link.server");
const { createTestTeam } = await import("../support/accounts");
const { directClient, run } = await import("../support/direct-requests");
const compareRoute = await import("~/routes/compare");
const comparisonsRoute = await import("~/routes/comparisons");

let team: Awaited<ReturnType<typeof createTestTeam>>;

beforeAll(async () => {
  team = await createTestTeam("Compare");
});
afterAll(async () => {
  await pool.end();
  await scratch.drop();
});

async function makeVehicle(identifier: string) {
  const data = vehicleData(team.id);
  // Fitted with damper variant A (the vehicle's baseline).
  return data.create(
    vehicleSchema.parse({
      name: "Compare car",
      identifier,
      cylinders: 4,
      stroke: 4,
      damperVariant: "A",
    }),
  );
}

/** One analysed drive log whose isolation is `dB` at every bin from 1000 to 2950 rpm. */
async function seedLog(
  vehicleId: number,
  log: {
    damperVariant: string;
    testDate: string | null;
    uploadedAt: string;
    blobKey?: string;
    dB?: number;
    condition?: "run-up" | "idle-neutral";
    gear?: number;
  },
) {
  const [row] = await db
    .insert(driveLogs)
    .values({
      teamId: team.id,
      vehicleId,
      fileName: `run-up-${log.damperVariant}.csv`,
      blobKey: log.blobKey ?? Math.random().toString(16).slice(2).padEnd(64, "0"),
      sizeBytes: 1000,
      condition: log.condition ?? "run-up",
      gear: log.gear ?? 3,
      damperVariant: log.damperVariant,
      testDate: log.testDate,
      notes: "",
      uploadedAt: new Date(log.uploadedAt),
      status: "done",
      progress: 1,
    })
    .$returningId();
  const [analysis] = await db
    .insert(analyses)
    .values({
      teamId: team.id,
      driveLogId: row!.id,
      version: 1,
      settings: {},
      firingOrder: 2,
      warnings: [],
      resultGz: gzipSync("{}"),
      orderMapGz: gzipSync("[]"),
    })
    .$returningId();
  const points = [];
  for (let rpm = 1000; rpm < 3000; rpm += 50)
    points.push({ analysisId: analysis!.id, rpm, dB: log.dB ?? 10, blocks: 4, aboveNoise: true });
  await db.insert(isolationPoints).values(points);
  await db
    .update(driveLogs)
    .set({ latestAnalysisId: analysis!.id })
    .where(eq(driveLogs.id, row!.id));
  return row!.id;
}

const engineer = () => directClient({ id: team.accounts.engineer.id, teamId: team.id });

async function comparePage(vehicleId: number, query: string) {
  const client = await engineer();
  const request = client.get(`/vehicles/${vehicleId}/compare?${query}`);
  return compareRoute.loader({
    request,
    params: { vehicleId: String(vehicleId) },
    context: {},
  } as Parameters<typeof compareRoute.loader>[0]);
}

async function suggestions(vehicleId: number) {
  const client = await engineer();
  const data = await comparisonsRoute.loader({
    request: client.get("/comparisons"),
    params: {},
    context: {},
  } as Parameters<typeof comparisonsRoute.loader>[0]);
  return data.vehicles.find((v) => v.id === vehicleId)!.suggestions.map((s) => s.href);
}

describe("the reference of a comparison (issue 11 §3.2)", () => {
  let vehicleId: number;
  const ids = { a: 0, b: 0 };
  // Flat curves: variant A isolates 10 dB, variant B 14 dB from 1000 to 3000 rpm, so B is 4.0 dB
  // better in every 250 rpm band (mean of equal values; rule in app/lib/domain/comparison.ts).
  const expectedVerdict =
    "Variant B isolates 4.0 dB more between 1000 and 3000 rpm than variant A.";

  beforeAll(async () => {
    vehicleId = await makeVehicle("CMP-REF");
    ids.a = await seedLog(vehicleId, {
      damperVariant: "A",
      testDate: "2026-11-04",
      uploadedAt: "2026-11-05T08:00:00Z",
      dB: 10,
    });
    ids.b = await seedLog(vehicleId, {
      damperVariant: "B",
      testDate: "2026-11-18",
      uploadedAt: "2026-11-18T15:00:00Z",
      dB: 14,
    });
  });

  it("is the same whatever order ?logs= lists the drive logs in", async () => {
    // The vehicle page's table lists the newest first: "Compare selected" sends B,A.
    const ticked = await comparePage(vehicleId, `logs=${ids.b},${ids.a}`);
    const urlOrder = await comparePage(vehicleId, `logs=${ids.a},${ids.b}`);
    for (const page of [ticked, urlOrder]) {
      expect(page.logs.map((l) => l.id)).toEqual([ids.a, ids.b]);
      expect(page.comparison.verdicts).toEqual([expectedVerdict]);
      expect(page.referenceNote).toBe(
        "Reference: variant A, the only drive log here with the vehicle's fitted damper variant (A).",
      );
      // Band 1500–1750: A 10.0, B 14.0, change B − A = +4.0 dB.
      const band = page.comparison.rows.find((r) => r.fromRpm === 1500)!;
      expect(band.dB).toEqual([10, 14]);
      expect(band.changeDb).toEqual([null, 4]);
    }
  });

  it("is the same from “Compare with…” on either drive log's page", async () => {
    for (const [from, other] of [
      [ids.a, ids.b],
      [ids.b, ids.a],
    ]) {
      const folded = await run(() => comparePage(vehicleId, `logs=${from}&with=${other}`));
      expect(folded.status).toBe(302);
      const query = new URL(folded.headers.get("location")!, "http://x").search.slice(1);
      const page = await comparePage(vehicleId, query);
      expect(page.logs.map((l) => l.id)).toEqual([ids.a, ids.b]);
      expect(page.comparison.verdicts).toEqual([expectedVerdict]);
    }
  });

  it("is the same on a share link of the comparison, whatever order it was shared in", async () => {
    const made = await createShare({
      teamId: team.id,
      caller: { userId: team.accounts.engineer.id, role: "engineer" },
      subject: { kind: "comparison", vehicleId, logIds: [ids.b, ids.a] },
      expiresInDays: 1,
      note: "",
      allowRawDownload: false,
    });
    const page = await sharePage.sharedPageData(await sharePage.requireShareForPage(made.token));
    expect(page.comparison!.logs.map((l) => l.id)).toEqual([ids.a, ids.b]);
    expect(page.comparison!.result.verdicts).toEqual([expectedVerdict]);
  });

  it("without the fitted variant, is the one tested first", async () => {
    const v = await makeVehicle("CMP-DATE");
    // Uploaded first but tested later: the test date decides, not the upload or the URL.
    const c = await seedLog(v, {
      damperVariant: "C",
      testDate: "2026-11-20",
      uploadedAt: "2026-11-01T08:00:00Z",
      dB: 12,
    });
    const d = await seedLog(v, {
      damperVariant: "D",
      testDate: "2026-11-10",
      uploadedAt: "2026-11-21T08:00:00Z",
      dB: 11,
    });
    for (const query of [`logs=${c},${d}`, `logs=${d},${c}`]) {
      const page = await comparePage(v, query);
      expect(page.logs.map((l) => l.id)).toEqual([d, c]);
      // 12 − 11 = 1.0 dB in every band, over the 0.5 dB threshold.
      expect(page.comparison.verdicts).toEqual([
        "Variant C isolates 1.0 dB more between 1000 and 3000 rpm than variant D.",
      ]);
      expect(page.referenceNote).toBe(
        "Reference: variant D, the one tested first (test date 2026-11-10).",
      );
    }
  });
});

describe("suggested comparisons (issue 11 §3.3)", () => {
  it("do not change when the same file is uploaded again later without a test date", async () => {
    const v = await makeVehicle("CMP-DUP");
    const a = await seedLog(v, {
      damperVariant: "A",
      testDate: "2026-11-04",
      uploadedAt: "2026-11-05T08:00:00Z",
    });
    const blobKey = "b".repeat(64);
    const b = await seedLog(v, {
      damperVariant: "B",
      testDate: "2026-11-18",
      uploadedAt: "2026-11-18T15:00:00Z",
      blobKey,
    });
    const before = await suggestions(v);
    expect(before).toEqual([`/vehicles/${v}/compare?logs=${a},${b}`]);
    // The same file again, a week later, without a test date (duplicateOf = b).
    await seedLog(v, {
      damperVariant: "B",
      testDate: null,
      uploadedAt: "2026-11-25T09:00:00Z",
      blobKey,
    });
    expect(await suggestions(v)).toEqual(before);
  });

  it("list every pair of variants: three variants give three pairs, one group per condition and gear", async () => {
    const v = await makeVehicle("CMP-THREE");
    const at = (variant: string, date: string, more = {}) =>
      seedLog(v, {
        damperVariant: variant,
        testDate: date,
        uploadedAt: `${date}T12:00:00Z`,
        ...more,
      });
    const a = await at("A", "2026-11-04");
    const b = await at("B", "2026-11-18");
    const c = await at("C", "2026-11-25");
    // Another gear: a group of its own, one pair.
    const a2 = await at("A", "2026-11-05", { gear: 2 });
    const c2 = await at("C", "2026-11-26", { gear: 2 });
    // C(3, 2) = 3 pairs in 3rd gear, the fitted A as reference; B before C by test date.
    expect(await suggestions(v)).toEqual([
      `/vehicles/${v}/compare?logs=${a2},${c2}`,
      `/vehicles/${v}/compare?logs=${a},${b}`,
      `/vehicles/${v}/compare?logs=${a},${c}`,
      `/vehicles/${v}/compare?logs=${b},${c}`,
    ]);
  });
});
