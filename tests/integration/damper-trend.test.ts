import { and, eq } from "drizzle-orm";
import { gunzipSync, gzipSync } from "node:zlib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { transferH } from "../support/analytic-log";
import { HttpClient } from "../support/http-client";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";
import { bearerFetch, TREND_SWEEP, uploadTrendLogs, type ApiFetch } from "../support/trend-logs";

// Issue 15 over HTTP against the real MariaDB and the production server: the damper-health trend
// API on a vehicle with analytic run-ups whose natural frequency rises, the team's trend reference
// speed, the vehicle's damper travel limit, and the start-stop and twist-margin targets. A
// database of its own: other test files' job runners must not take these jobs.
const testbed = await useJobTestbed("trend");
const { db, pool } = await import("~/lib/infra/db.server");
const { auditEvents } = await import("~/lib/infra/db/schema");
const { analyses, driveLogs, vehicles } = await import("~/lib/infra/db/schema-drive-logs");
const { createApiToken } = await import("~/lib/data/api-tokens.server");
const { targetData } = await import("~/lib/data/targets.server");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");
type TestTeam = Awaited<ReturnType<typeof createTestTeam>>;
type Trend = import("~/lib/domain/trend").VehicleTrend;

let server: Awaited<ReturnType<typeof startServer>>;
let team: TestTeam;
let other: TestTeam;
const api: Record<"engineer" | "viewer" | "other", ApiFetch> = {} as never;
let vehicleId: number;
let logIds: number[];

// Four run-ups (tests/support/trend-logs.ts): fn 12 → 13.8 Hz, +15 % over the series, ζ 0.15.
const SERIES = [
  { fnHz: 12, testDate: "2026-11-04" },
  { fnHz: 12.6, testDate: "2026-11-18" }, // +5 %: inside the ±10 % threshold
  { fnHz: 13, testDate: "2026-12-02" }, // +8.3 %: inside
  { fnHz: 13.8, testDate: "2026-12-16" }, // +15 %: flagged
];

/** −20·log10|H(r)| at the firing order (Harris' Shock and Vibration Handbook ch. 30; Ogata eq. 9-14). */
const formulaDb = (rpm: number, fnHz: number) =>
  -20 * Math.log10(transferH(((rpm / 60) * TREND_SWEEP.order) / fnHz, TREND_SWEEP.zeta).magnitude);

beforeAll(async () => {
  [server, team, other] = await Promise.all([
    startServer(testbed.serverEnv),
    createTestTeam("Trend"),
    createTestTeam("Elsewhere"),
  ]);
  for (const [key, t, role] of [
    ["engineer", team, "engineer"],
    ["viewer", team, "viewer"],
    ["other", other, "engineer"],
  ] as const) {
    const { token } = await createApiToken({
      userId: t.accounts[role].id,
      teamId: t.id,
      name: `trend ${key}`,
      expiresAt: null,
    });
    api[key] = bearerFetch(server.url, token);
  }
}, 60_000);
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

const postJson = (f: ApiFetch, path: string, body: unknown) =>
  f(path, {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify(body),
  });

async function trendOf(id = vehicleId, f = api.viewer) {
  const r = await f(`/api/v1/vehicles/${id}/trend`);
  return { status: r.status, body: (await r.json()) as Trend & { error?: { code: string } } };
}

describe("the vehicle's damper travel limit", () => {
  it("round-trips through the API and refuses values that cannot be a travel limit", async () => {
    const made = await postJson(api.engineer, "/api/v1/vehicles", {
      name: "Trend car",
      identifier: "TRD-4",
      cylinders: 4,
      stroke: 4,
      damperTravelLimitDeg: 60,
    });
    expect(made.status).toBe(201);
    const { vehicle } = (await made.json()) as {
      vehicle: { id: number; damperTravelLimitDeg: number };
    };
    expect(vehicle.damperTravelLimitDeg).toBe(60);
    vehicleId = vehicle.id;
    const read = (await (await api.viewer(`/api/v1/vehicles/${vehicleId}`)).json()) as {
      vehicle: { damperTravelLimitDeg: number | null };
    };
    expect(read.vehicle.damperTravelLimitDeg).toBe(60);
    const none = (await (
      await postJson(api.engineer, "/api/v1/vehicles", {
        name: "No limit",
        identifier: "TRD-0",
        cylinders: 4,
        stroke: 4,
      })
    ).json()) as { vehicle: { damperTravelLimitDeg: number | null } };
    expect(none.vehicle.damperTravelLimitDeg).toBeNull();
    for (const [value, message] of [
      [0, "damperTravelLimitDeg: The damper travel limit is more than 0°."],
      [-5, "damperTravelLimitDeg: The damper travel limit is more than 0°."],
      [500, "damperTravelLimitDeg: The damper travel limit is at most 180° (stop to stop)."],
      ["wide", "damperTravelLimitDeg: The damper travel limit is a number of degrees, e.g. 60."],
    ] as const) {
      const r = await postJson(api.engineer, "/api/v1/vehicles", {
        name: "Bad",
        identifier: `TRD-B${String(value)}`,
        cylinders: 4,
        stroke: 4,
        damperTravelLimitDeg: value,
      });
      expect(r.status).toBe(400);
      expect(await r.json()).toEqual({ error: { code: "invalid_vehicle", message } });
    }
  });

  it("the edit form shows the field, refuses a bad value with its message, and saves or clears it", async () => {
    const engineer = await HttpClient.signedIn(
      server.url,
      team.accounts.engineer.email,
      TEST_PASSWORD,
    );
    const path = `/vehicles/${vehicleId}/edit`;
    const page = await engineer.get(path);
    expect(page.html).toContain("Damper travel limit");
    expect(page.html).toContain("stop to stop");
    const base = {
      intent: "save",
      name: "Trend car",
      identifier: "TRD-4",
      cylinders: "4",
      stroke: "4",
      fuel: "diesel",
      idleRpm: "800",
      transmissionType: "manual",
      damperType: "dual-mass-flywheel",
      damperVariant: "A",
      rattleLimitRadS2: "500",
    };
    const refused = await engineer.post(path, { ...base, damperTravelLimitDeg: "250" });
    expect(refused.status).toBe(400);
    expect(refused.html).toContain("The damper travel limit is at most 180° (stop to stop).");
    const cleared = await engineer.post(path, { ...base, damperTravelLimitDeg: "" });
    expect(cleared.status).toBe(302);
    const read = async () =>
      (
        (await (await api.viewer(`/api/v1/vehicles/${vehicleId}`)).json()) as {
          vehicle: { damperTravelLimitDeg: number | null };
        }
      ).vehicle.damperTravelLimitDeg;
    expect(await read()).toBeNull();
    expect((await engineer.post(path, { ...base, damperTravelLimitDeg: "62.5" })).status).toBe(302);
    expect(await read()).toBe(62.5);
    const shown = await engineer.get(`/vehicles/${vehicleId}`);
    expect(shown.html).toContain("travel limit 62.5° stop to stop");
  });
});

describe("GET /api/v1/vehicles/:vehicleId/trend", () => {
  it("answers an empty trend before any drive log, 404 for another team's vehicle", async () => {
    const { status, body } = await trendOf();
    expect(status).toBe(200);
    expect(body).toMatchObject({ vehicleId, referenceRpm: 1500, variants: [] });
    expect(body.thresholds).toEqual({
      naturalFrequencyPct: 10,
      dampingRatioPct: 25,
      isolationDb: 3,
      amplificationDb: 3,
    });
    const stranger = await trendOf(vehicleId, api.other);
    expect(stranger.status).toBe(404);
    expect(stranger.body.error?.code).toBe("not_found");
  });

  it("shows a natural frequency rising 15 % over four run-ups, and flags it against the first", async () => {
    logIds = await uploadTrendLogs(api.engineer, vehicleId, SERIES);
    const { status, body } = await trendOf();
    expect(status).toBe(200);
    expect(body.variants).toHaveLength(1);
    const v = body.variants[0]!;
    expect(v.damperVariant).toBe("A");
    expect(v.baseline).toEqual({ logId: logIds[0], date: "2026-11-04", kind: "first-analysed" });
    expect(v.points.map((p) => [p.logId, p.date, p.dateIsUpload])).toEqual(
      SERIES.map((s, i) => [logIds[i], s.testDate, false]),
    );
    for (const [i, p] of v.points.entries()) {
      const fn = SERIES[i]!.fnHz;
      // The two-mass fit's stated accuracy on an analytic run-up: ωn within 5 %, ζ within 20 %
      // (app/lib/signal/analyse.test.ts, "the two-mass fit").
      expect(Math.abs(p.naturalFrequencyHz! / fn - 1)).toBeLessThan(0.05);
      expect(Math.abs(p.dampingRatio! / TREND_SWEEP.zeta - 1)).toBeLessThan(0.2);
      // Isolation in the 1500 rpm bin: the formula within 0.3 dB (the signal tests' tolerance
      // for r ≥ 1.6; here r = 50 Hz / fn ≥ 3.6).
      expect(Math.abs(p.isolationAtReferenceDb! - formulaDb(1500, fn))).toBeLessThan(0.3);
      // Run-ups have no engine start or stop.
      expect(p.startStopPeakAmplificationDb).toBeNull();
    }
    // The rise: 13.8 / 12 = +15 %. Both fits share the sweep and ζ, so their bias cancels in the
    // ratio; our tolerance ±1.5 points (measured with the CLI: +15.1 %).
    const rise = (v.points[3]!.naturalFrequencyHz! / v.points[0]!.naturalFrequencyHz! - 1) * 100;
    expect(Math.abs(rise - 15)).toBeLessThan(1.5);
    // Only the last log is beyond ±10 % (docs/trend.md); isolation changes by
    // formulaDb(1500, 13.8) − formulaDb(1500, 12) ≈ −1.9 dB, inside ±3 dB.
    expect(v.flags).toHaveLength(1);
    expect(v.flags[0]).toMatchObject({
      quantity: "naturalFrequencyHz",
      logId: logIds[3],
      unit: "%",
      baselineDate: "2026-11-04",
    });
    expect(Math.abs(v.flags[0]!.change - 15)).toBeLessThan(1.5);
    // The trend read the fit from the analyses row, which saving filled from the result's model.
    for (const [i, id] of logIds.entries()) {
      const r = await api.viewer(`/api/v1/logs/${id}/result`);
      const { model } = (await r.json()) as {
        model: { naturalFrequencyHz: number; dampingRatio: number };
      };
      const [row] = await db
        .select({
          hz: analyses.modelNaturalHz,
          zeta: analyses.modelDampingRatio,
          peak: analyses.eventPeakDb,
        })
        .from(analyses)
        .where(eq(analyses.id, v.points[i]!.analysisId));
      expect(row).toEqual({ hz: model.naturalFrequencyHz, zeta: model.dampingRatio, peak: null });
      expect(v.points[i]!.naturalFrequencyHz).toBe(model.naturalFrequencyHz);
    }
    expect(v.flags[0]!.message).toMatch(/^natural frequency up 1[4-6] % since 4 Nov 2026$/);
  });

  it("reads the isolation at the team's reference speed, which engineers set on the team page", async () => {
    const technician = await HttpClient.signedIn(
      server.url,
      team.accounts.technician.email,
      TEST_PASSWORD,
    );
    await technician.get("/team");
    expect(
      (await technician.post("/team", { intent: "set-trend-reference", referenceRpm: "2000" }))
        .status,
    ).toBe(403);
    const engineer = await HttpClient.signedIn(
      server.url,
      team.accounts.engineer.email,
      TEST_PASSWORD,
    );
    const page = await engineer.get("/team");
    expect(page.html).toContain("Trend reference speed");
    const refused = await engineer.post("/team", {
      intent: "set-trend-reference",
      referenceRpm: "50",
    });
    expect(refused.status).toBe(400);
    expect(refused.html).toContain(
      "The trend reference speed is a whole number of rpm from 600 to 8000, e.g. 1500.",
    );
    const saved = await engineer.post("/team", {
      intent: "set-trend-reference",
      referenceRpm: "2000",
    });
    expect(saved.status).toBe(200);
    expect(saved.html).toContain("The damper-health trend now reads the isolation at 2000 rpm.");
    const audited = await db
      .select({ detail: auditEvents.detail })
      .from(auditEvents)
      .where(and(eq(auditEvents.teamId, team.id), eq(auditEvents.action, "team-settings-changed")));
    expect(audited.map((a) => a.detail)).toContain("trend reference speed 2000 rpm");
    const { body } = await trendOf();
    expect(body.referenceRpm).toBe(2000);
    for (const [i, p] of body.variants[0]!.points.entries())
      expect(Math.abs(p.isolationAtReferenceDb! - formulaDb(2000, SERIES[i]!.fnHz))).toBeLessThan(
        0.3,
      );
  });
});

describe("start-stop and twist-margin targets", () => {
  const path = () => `/vehicles/${vehicleId}`;

  it("an engineer sets them with the page's form; missing or bad limits are refused with a message", async () => {
    const engineer = await HttpClient.signedIn(
      server.url,
      team.accounts.engineer.email,
      TEST_PASSWORD,
    );
    await engineer.get(path());
    const missing = await engineer.post(path(), {
      intent: "create-target",
      kind: "start-stop",
      name: "No limit",
    });
    expect(missing.status).toBe(400);
    expect(missing.html).toContain("Enter the maximum peak amplification in dB.");
    const negative = await engineer.post(path(), {
      intent: "create-target",
      kind: "twist-margin",
      name: "Negative",
      minMarginDeg: "-1",
    });
    expect(negative.status).toBe(400);
    expect(negative.html).toContain("The minimum twist margin is at least 0°.");
    for (const fields of <Record<string, string>[]>[
      { intent: "create-target", kind: "start-stop", name: "Start/stop peak", maxDb: "8" },
      { intent: "create-target", kind: "twist-margin", name: "End-stop margin", minMarginDeg: "5" },
    ]) {
      const r = await engineer.post(path(), fields);
      expect([fields.name, r.status]).toEqual([fields.name, 200]);
    }
    const stored = await targetData(team.id).list(vehicleId);
    expect(stored.find((t) => t.name === "Start/stop peak")).toMatchObject({
      kind: "start-stop",
      maxDb: 8,
      minMarginDeg: null,
      minDb: null,
      maxRadS2: null,
    });
    expect(stored.find((t) => t.name === "End-stop margin")).toMatchObject({
      kind: "twist-margin",
      minMarginDeg: 5,
      maxDb: null,
    });
    const page = await engineer.get(path());
    expect(page.html).toContain("peak amplification at engine start and stop at most 8.0 dB");
    expect(page.html).toContain("start/stop twist at least 5.0° short of the damper travel limit");
  });

  it("judges the stored events: hand-computed margins, not covered without events, not applicable without a travel limit", async () => {
    const logs = await db
      .select({
        id: driveLogs.id,
        condition: driveLogs.condition,
        gear: driveLogs.gear,
        latestAnalysisId: driveLogs.latestAnalysisId,
      })
      .from(driveLogs)
      .where(eq(driveLogs.vehicleId, vehicleId));
    const verdicts = async () => {
      const all = await targetData(team.id).verdictsForLogs(vehicleId, logs);
      return (logId: number, kind: string) => all.get(logId)!.find((v) => v.kind === kind)!;
    };
    // Events written into the first log's stored result: peaks 6.5 and 9.25 dB, twists 20° and 57.25°.
    const [row] = await db
      .select()
      .from(analyses)
      .where(eq(analyses.id, logs.find((l) => l.id === logIds[0])!.latestAnalysisId!));
    const result = JSON.parse(gunzipSync(row!.resultGz).toString("utf8")) as Record<
      string,
      unknown
    >;
    const event = (kind: string, startS: number, peak: number, twist: number) => ({
      kind,
      startS,
      endS: startS + 2,
      resonanceRpm: 380,
      peakAmplificationDb: peak,
      timeNearResonanceS: 0.3,
      peakGearboxAngAccelRadS2: 900,
      twistPeakToPeakDeg: twist,
    });
    result.events = [event("start", 0.5, 6.5, 20), event("stop", 35, 9.25, 57.25)];
    await db
      .update(analyses)
      .set({
        resultGz: gzipSync(JSON.stringify(result)),
        eventPeakDb: 9.25,
        eventTwistPpDeg: 57.25,
      })
      .where(eq(analyses.id, row!.id));
    // (Before any verdict is asked for: a saved analysis never changes, so what is read is kept.)
    let judge = await verdicts();
    // The other run-ups have no start or stop: not covered (before issue 15's detection landed,
    // such a result has no events at all and the sentence asks for a re-analysis instead).
    expect(judge(logIds[1]!, "start-stop").status).toBe("not-covered");
    expect(judge(logIds[1]!, "start-stop").detail).toMatch(/No engine start or stop|re-analyse/);
    // Start-stop: value 9.25 dB, margin 8 − 9.25 = −1.25 dB → fail (docs/targets.md).
    expect(judge(logIds[0]!, "start-stop")).toMatchObject({
      status: "fail",
      value: 9.25,
      margin: -1.25,
      atRpm: 380,
    });
    // Twist margin: travel 62.5° − 57.25° = 5.25°; margin 5.25 − 5 = 0.25° → pass.
    expect(judge(logIds[0]!, "twist-margin")).toMatchObject({
      status: "pass",
      value: 5.25,
      margin: 0.25,
      unit: "°",
    });
    // The trend's start/stop point of that log comes from the analyses row.
    const { body } = await trendOf();
    expect(body.variants[0]!.points[0]!.startStopPeakAmplificationDb).toBe(9.25);
    // Without a travel limit the twist-margin target does not apply, and says why.
    await db.update(vehicles).set({ damperTravelLimitDeg: null }).where(eq(vehicles.id, vehicleId));
    judge = await verdicts();
    expect(judge(logIds[0]!, "twist-margin").status).toBe("not-applicable");
    expect(judge(logIds[0]!, "twist-margin").detail).toMatch(/no damper travel limit/);
  });
});
