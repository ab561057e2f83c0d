/**
 * Evidence-report models built from real analyses (issue 16): analytic drive logs (./synth-log,
 * the two-mass transfer function of Harris ch. 30 / Ogata eq. 9-14) run through the app's own
 * analyseDriveLog, judged with evaluateTargets and checkClaims. Shared by the report's tests and
 * `npm run bench` (bench/report.bench.ts). Set in the invented Kestrel test programme.
 */
import { createHash } from "node:crypto";
import { analyseDriveLog } from "../../app/lib/signal/analyse.ts";
import type { AnalysisResult } from "../../app/lib/signal/result-schema.ts";
import { evaluateTargets, type Target } from "../../app/lib/domain/targets.ts";
import {
  checkClaims,
  type ClaimLog,
  type RecordLog,
  type RecordTarget,
  type SignoffClaimInput,
  type SignoffDeviation,
} from "../../app/lib/domain/signoff.ts";
import type { LogCondition } from "../../app/lib/domain/drive-log-terms.ts";
import type { ReportLog, ReportModel } from "../../app/lib/report/report-model.ts";
import { CAUTIONS } from "../../app/lib/domain/cautions.ts";
import { synthLog } from "./synth-log.ts";

const ramp = (from: number, to: number, t0: number, rate: number) => (t: number) => {
  const end = t0 + Math.abs(to - from) / rate;
  return t < t0 ? from : t < end ? from + Math.sign(to - from) * rate * (t - t0) : to;
};

/** The drive logs the fixtures analyse: speed profile and damper (fn, ζ) of each. */
export const FIXTURE_LOGS = {
  runUp: {
    fileName: "kestrel-d4-runup-gear3.csv",
    condition: "run-up" as LogCondition,
    gear: 3,
    profile: ramp(800, 3000, 1, 110),
    durationS: 22,
    fnHz: 22,
    zeta: 0.15,
  },
  idleStop: {
    fileName: "kestrel-d4-idle-then-stop.csv",
    condition: "idle-in-gear" as LogCondition,
    gear: 1,
    profile: ramp(800, 0, 10, 400),
    durationS: 14,
    fnHz: 12,
    zeta: 0.1,
  },
  runUpSoft: {
    fileName: "kestrel-d4-runup-gear3-soft-spring.csv",
    condition: "run-up" as LogCondition,
    gear: 3,
    profile: ramp(800, 3000, 1, 110),
    durationS: 22,
    fnHz: 40,
    zeta: 0.12,
  },
} as const;

export type FixtureLogName = keyof typeof FIXTURE_LOGS;

/**
 * Analyses one fixture log with the app's pipeline (4 cylinders, four-stroke: order 2); `sha256`
 * is the SHA-256 of the log's samples (time, crank, gearbox as float64), standing in for the raw
 * file's bytes.
 */
export function analyseFixture(name: FixtureLogName): { result: AnalysisResult; sha256: string } {
  const p = FIXTURE_LOGS[name];
  const log = synthLog({
    fs: 1000,
    durationS: p.durationS,
    rpmAt: p.profile,
    order: 2,
    ampRpm: 12,
    fnHz: p.fnHz,
    zeta: p.zeta,
    noiseRpm: 0.02,
  });
  const out = analyseDriveLog(log, { cylinders: 4, stroke: 4 });
  if (!out.ok) throw new Error(`fixture ${name}: ${out.error.code} ${out.error.message}`);
  const hash = createHash("sha256");
  for (const a of [log.timeS, log.crankRadS, log.gearboxRadS])
    hash.update(new Uint8Array(a.buffer));
  return { result: out.value, sha256: hash.digest("hex") };
}

const sha = (text: string) => createHash("sha256").update(text).digest("hex");
const at = (iso: string) => new Date(iso).toISOString();

/** The Kestrel D4's targets (ids 11–15), as the sign-off recorded them. */
export const FIXTURE_TARGETS: RecordTarget[] = [
  target(11, "isolation", "Isolation, cruise 1500–3000 rpm", {
    rpmFrom: 1500,
    rpmTo: 3000,
    minDb: 10,
  }),
  target(12, "rattle", "Idle rattle in gear", { maxRadS2: 500 }),
  target(13, "start-stop", "Engine stop amplification", { maxDb: 12 }),
  target(14, "twist-margin", "End-stop margin at starts and stops", { minMarginDeg: 5 }),
  target(15, "isolation", "Isolation, drive-away 900–1400 rpm", {
    rpmFrom: 900,
    rpmTo: 1400,
    minDb: 3,
  }),
];

function target(id: number, kind: Target["kind"], name: string, values: Partial<Target>) {
  return {
    id,
    name,
    kind,
    rpmFrom: null,
    rpmTo: null,
    minDb: null,
    maxRadS2: null,
    maxDb: null,
    minMarginDeg: null,
    conditions: [],
    gears: [],
    ...values,
    updatedAt: at("2026-10-20T09:15:00Z"),
  } satisfies RecordTarget;
}

export const FIXTURE_VEHICLE: ReportModel["vehicle"] = {
  id: 7,
  identifier: "KST-D4",
  name: "Kestrel estate 2.0 diesel",
  damperType: "dual-mass-flywheel",
  firingOrder: 2,
  rattleLimitRadS2: 500,
  damperTravelLimitDeg: 30,
};

const VARIANT = "DMF-B2";

/** One analysed drive log as the report holds it. */
export interface FixtureLog {
  id: number;
  fileName: string;
  sha256: string;
  condition: LogCondition;
  gear: number | null;
  result: AnalysisResult;
}

/** The three fixture logs analysed once (ids 101–103). */
export function fixtureLogs(): FixtureLog[] {
  return (["runUp", "idleStop", "runUpSoft"] as const).map((name, i) => {
    const { result, sha256 } = analyseFixture(name);
    const p = FIXTURE_LOGS[name];
    return {
      id: 101 + i,
      fileName: p.fileName,
      sha256,
      condition: p.condition,
      gear: p.gear,
      result,
    };
  });
}

/** `count` logs made of the fixture logs in turn, each with its own name, id and hash (bench). */
export function manyLogs(base: readonly FixtureLog[], count: number): FixtureLog[] {
  return Array.from({ length: count }, (_, i) => {
    const b = base[i % base.length]!;
    const fileName = b.fileName.replace(/\.csv$/, `-run${String(i + 1).padStart(2, "0")}.csv`);
    return { ...b, id: 1000 + i, fileName, sha256: sha(`${b.sha256}:${i}`) };
  });
}

function recordLog(l: FixtureLog, i: number): RecordLog {
  return {
    id: l.id,
    fileName: l.fileName,
    sha256: l.sha256,
    sizeBytes: 812_345 + 1000 * i,
    uploadedAt: at(`2026-11-0${1 + (i % 8)}T08:${String(10 + (i % 40)).padStart(2, "0")}:00Z`),
    testDate: `2026-10-${String(20 + (i % 9)).padStart(2, "0")}`,
    condition: l.condition,
    gear: l.gear,
    damperVariant: VARIANT,
    analysis: {
      id: 500 + i,
      version: 1 + (i % 3),
      createdAt: at(`2026-11-0${1 + (i % 8)}T08:${String(12 + (i % 40)).padStart(2, "0")}:00Z`),
      settings: { ...l.result.settings, mappingSource: "recognised" },
      resultSha256: sha(JSON.stringify(l.result)),
    },
  };
}

export interface FixtureOptions {
  logs: readonly FixtureLog[];
  /** Claims by target id and the indices of `logs` behind each; default: every target, every log. */
  claims?: readonly { targetId: number; logs: readonly number[] }[];
  deviations?: readonly SignoffDeviation[];
  state?: ReportModel["state"];
  draft?: boolean;
  signoffId?: number | null;
  digest?: string | null;
  note?: string;
  steps?: ReportModel["steps"];
  amplitudeUnit?: ReportModel["amplitudeUnit"];
}

/**
 * A ReportModel the way the data layer builds one: each log's verdicts from evaluateTargets over
 * every target, the claims from checkClaims.
 */
export function fixtureModel(o: FixtureOptions): ReportModel {
  const vehicle = FIXTURE_VEHICLE;
  const reportLogs: ReportLog[] = o.logs.map((l, i) => ({
    log: recordLog(l, i),
    result: l.result,
    verdicts: evaluateTargets(FIXTURE_TARGETS, l, {
      ...l.result,
      binRpm: l.result.settings.binRpm,
      events: l.result.events ?? null,
      damperTravelLimitDeg: vehicle.damperTravelLimitDeg,
    }),
  }));
  const claimLogs = new Map<number, ClaimLog>(
    reportLogs.map((r) => [
      r.log.id,
      { id: r.log.id, fileName: r.log.fileName, damperVariant: VARIANT, verdicts: r.verdicts },
    ]),
  );
  const claims: SignoffClaimInput[] = (
    o.claims ?? FIXTURE_TARGETS.map((t) => ({ targetId: t.id, logs: o.logs.map((_, i) => i) }))
  ).map((c) => ({ targetId: c.targetId, logIds: c.logs.map((i) => reportLogs[i]!.log.id) }));
  const check = checkClaims({
    targets: FIXTURE_TARGETS,
    claims,
    deviations: o.deviations ?? [],
    logs: claimLogs,
    damperVariant: VARIANT,
  });
  if (check.problems.length) throw new Error(check.problems.join(" "));
  const signoffId = o.signoffId === undefined ? 42 : o.signoffId;
  return {
    draft: o.draft ?? false,
    state: o.state ?? "approved",
    signoffId,
    vehicle,
    damperVariant: VARIANT,
    programme: "Kestrel driveline NVH",
    date: at("2026-11-05T15:30:00Z"),
    generatedAt: at("2026-11-06T07:00:00Z"),
    softwareVersion: "twistlog 0.1.0+3f2c9a1e07b4",
    targets: FIXTURE_TARGETS,
    claims: check.checks,
    logs: reportLogs,
    note: o.note ?? "",
    digest: o.digest === undefined ? null : o.digest,
    steps: o.steps ?? [],
    cautions: CAUTIONS,
    amplitudeUnit: o.amplitudeUnit ?? "rpm",
  };
}
