import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analysisResultSchema } from "~/lib/signal";
import { analyticIdleCsv, expectedIsolationDb, IDLE_800 } from "../support/analytic-log";
import { HttpClient } from "../support/http-client";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// Issue 11 §3.1 through the real upload path: the form upload of the vehicle page, the job
// runner of the production server, the column-mapping form of the drive-log page. A column
// choice made by hand for one odd file is remembered for the vehicle, but the next upload with an
// ordinary header must still be recognised from its header. A database of its own (job runners).
const testbed = await useJobTestbed("columns");
const { pool } = await import("~/lib/infra/db.server");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { vehicleSchema } = await import("~/lib/domain/vehicle-schema");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");

let server: Awaited<ReturnType<typeof startServer>>;
let team: Awaited<ReturnType<typeof createTestTeam>>;
let technician: HttpClient;
let vehicleId: number;

const idle = IDLE_800; // isolation known from the two-mass formula (tests/support/analytic-log.ts)
const standard = analyticIdleCsv(idle);
/**
 * The same samples as a logger with its own names writes them: `;` between fields, decimal
 * commas, time, crank, gearbox and a temperature channel named only by number.
 */
function oddCsv(source: string, badRow?: number): string {
  const [, ...rows] = source.trimEnd().split("\n");
  const body = rows.map((r, i) => {
    const [t, crank, gearbox] = r.split(",");
    const c = badRow === i + 2 ? "n/a" : crank!.replace(".", ",");
    return `${t!.replace(".", ",")};${c};${gearbox!.replace(".", ",")};21,5`;
  });
  return ["Zeit;Kanal1;Kanal2;Kanal3", ...body].join("\n") + "\n";
}

beforeAll(async () => {
  [server, team] = await Promise.all([startServer(testbed.serverEnv), createTestTeam("Columns")]);
  const data = vehicleData(team.id);
  vehicleId = await data.create(
    vehicleSchema.parse({
      name: "Kestrel logger car",
      identifier: "COL-1",
      cylinders: 4,
      stroke: 4,
    }),
  );
  technician = new HttpClient(server.url);
  expect((await technician.signIn(team.accounts.technician.email, TEST_PASSWORD)).status).toBe(302);
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

/** The vehicle page's plain upload (csrf from a fresh page load); resolves with the new log's id. */
async function upload(name: string, content: string): Promise<number> {
  await technician.get(`/vehicles/${vehicleId}`);
  return technician.uploadDriveLog(vehicleId, name, content);
}

async function finished(id: number): Promise<"done" | "failed"> {
  for (let i = 0; i < 240; i++) {
    const log = await vehicleData(team.id).log(id);
    if (log.status === "done" || log.status === "failed") return log.status;
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error(`drive log ${id} did not finish`);
}

/** Isolation at 800 rpm of the latest analysis. */
async function isolationAt800(id: number): Promise<number> {
  const result = analysisResultSchema.parse(await vehicleData(team.id).latestResult(id));
  const at800 = result.isolation.find((p) => Math.abs(p.rpm - 800) <= 25);
  expect(at800).toBeDefined();
  return at800!.dB;
}

describe("a remembered column choice", () => {
  it("mapped by hand for an odd file, it does not break the next upload with a standard header", async () => {
    const odd = await upload("logger-a.csv", oddCsv(standard));
    expect(await finished(odd)).toBe("failed");
    const path = `/vehicles/${vehicleId}/logs/${odd}`;
    const page = await technician.get(path);
    expect(page.html).toContain("Channel chooser");
    const mapped = await technician.post(path, {
      intent: "map",
      timeColumn: "Zeit",
      crankColumn: "Kanal1",
      gearboxColumn: "Kanal2",
      crankUnit: "rpm",
      gearboxUnit: "rpm",
    });
    expect(mapped.status).toBe(200);
    expect(await finished(odd)).toBe("done");
    // The columns were really read: isolation against −20·log10|H(r)| of the base-excited two-mass
    // system (Harris' Shock and Vibration Handbook ch. 30; Ogata, System Dynamics, eq. 9-14), 0.3 dB.
    expect(Math.abs((await isolationAt800(odd)) - expectedIsolationDb(idle))).toBeLessThan(0.3);
    expect((await vehicleData(team.id).vehicle(vehicleId)).columnMapping).toMatchObject({
      timeColumn: "Zeit",
    });

    // The regression: this upload failed with `no column named "Zeit" for the time channel`.
    const plain = await upload("standard.csv", standard);
    expect(await finished(plain)).toBe("done");
    expect(Math.abs((await isolationAt800(plain)) - expectedIsolationDb(idle))).toBeLessThan(0.3);
    const plainPage = await technician.get(`/vehicles/${vehicleId}/logs/${plain}`);
    expect(plainPage.html).toContain(
      "The last analysis recognised the channels by their names in the file.",
    );
    expect(plainPage.html).toContain("left out: this file does not have its columns");
    expect(await vehicleData(team.id).appliedColumns(plain)).toMatchObject({
      source: "header",
      mapping: {},
    });

    // Another file from the same logger: the remembered choice fits and is used.
    const again = await upload("logger-b.csv", oddCsv(analyticIdleCsv({ ...idle, durationS: 8 })));
    expect(await finished(again)).toBe("done");
    expect(await vehicleData(team.id).appliedColumns(again)).toMatchObject({
      source: "remembered",
      mapping: { timeColumn: "Zeit", crankColumn: "Kanal1", gearboxColumn: "Kanal2" },
    });
    const againPage = await technician.get(`/vehicles/${vehicleId}/logs/${again}`);
    expect(againPage.html).toContain("used this vehicle&#x27;s remembered column choice");
  });

  it("a drive log that was read fine offers no column choice: a posted one is refused and changes nothing", async () => {
    const done = await upload("standard-2.csv", standard);
    expect(await finished(done)).toBe("done");
    const before = (await vehicleData(team.id).vehicle(vehicleId)).columnMapping;
    const versions = (await vehicleData(team.id).versions(done)).length;
    const path = `/vehicles/${vehicleId}/logs/${done}`;
    expect((await technician.get(path)).html).not.toContain("Channel chooser");
    // Columns that exist in the file (so only the log's state can refuse it), swapped around.
    const posted = await technician.post(path, {
      intent: "map",
      timeColumn: "time [s]",
      crankColumn: "gearbox input speed [rpm]",
      gearboxColumn: "crank speed [rpm]",
      crankUnit: "rpm",
      gearboxUnit: "rpm",
    });
    expect(posted.status).toBe(409);
    expect(posted.html).toContain("nothing was changed");
    expect((await vehicleData(team.id).vehicle(vehicleId)).columnMapping).toEqual(before);
    expect(await vehicleData(team.id).log(done)).toMatchObject({ status: "done" });
    expect((await vehicleData(team.id).versions(done)).length).toBe(versions);
  });

  it("a failed log's form starts from the columns that run really used, and says where they came from", async () => {
    // Row 5 has text in the crank column; the remembered choice (from the test above) applies.
    const bad = await upload("logger-bad.csv", oddCsv(analyticIdleCsv(idle), 5));
    expect(await finished(bad)).toBe("failed");
    expect(await vehicleData(team.id).log(bad)).toMatchObject({
      error: { code: "not_numeric", row: 5, column: "Kanal1" },
    });
    const page = await technician.get(`/vehicles/${vehicleId}/logs/${bad}`);
    expect(page.html).toContain('data-columns-used="remembered"');
    // The channel chooser starts from the columns that run used (initialPicks, unit-tested in
    // tests/unit/channel-picks.test.ts), which the page hands it as `applied`.
    expect(await vehicleData(team.id).appliedColumns(bad)).toMatchObject({
      source: "remembered",
      mapping: { timeColumn: "Zeit", crankColumn: "Kanal1", gearboxColumn: "Kanal2" },
    });
    expect(page.html).toContain("Channel chooser");
  });
});
