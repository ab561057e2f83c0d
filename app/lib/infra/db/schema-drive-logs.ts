import {
  bigint,
  boolean,
  date,
  double,
  index,
  int,
  json,
  mysqlEnum,
  mysqlTable,
  primaryKey,
  smallint,
  text,
  tinyint,
  uniqueIndex,
  varchar,
} from "drizzle-orm/mysql-core";
import { at, createdAt, id, mediumBlob, ref } from "./columns";
import { teams, users } from "./schema";
import {
  DAMPER_TYPES,
  FUELS,
  JOB_STATES,
  LOG_CONDITIONS,
  LOG_STATES,
  TRANSMISSION_TYPES,
  type IngestMapping,
  type LogError,
} from "../../domain/drive-log-terms";

/** An instrumented test vehicle of a team, with its engine, transmission and damper. */
export const vehicles = mysqlTable(
  "vehicles",
  {
    id: id(),
    teamId: ref("team_id")
      .notNull()
      .references(() => teams.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 120 }).notNull(),
    /** The team's own short code, e.g. a fleet number. */
    identifier: varchar("identifier", { length: 40 }).notNull(),
    cylinders: tinyint("cylinders", { unsigned: true }).notNull(),
    stroke: tinyint("stroke", { unsigned: true }).notNull(),
    fuel: mysqlEnum("fuel", FUELS).notNull(),
    idleRpm: smallint("idle_rpm", { unsigned: true }).notNull(),
    /** Orders per crank revolution when z/2 (or z) does not hold, e.g. cylinder deactivation. */
    firingOrderOverride: double("firing_order_override"),
    transmissionType: mysqlEnum("transmission_type", TRANSMISSION_TYPES).notNull(),
    /** Gear ratios, first gear first; empty when not known. */
    gearRatios: json("gear_ratios").$type<number[]>().notNull(),
    damperType: mysqlEnum("damper_type", DAMPER_TYPES).notNull(),
    damperVariant: varchar("damper_variant", { length: 80 }).notNull(),
    primaryInertiaKgM2: double("primary_inertia_kg_m2"),
    secondaryInertiaKgM2: double("secondary_inertia_kg_m2"),
    springRateNmPerDeg: double("spring_rate_nm_per_deg"),
    rattleLimitRadS2: double("rattle_limit_rad_s2").notNull().default(500),
    /** Spring travel between the damper's end stops (stop to stop), degrees; null: not known. */
    damperTravelLimitDeg: double("damper_travel_limit_deg"),
    /** The column mapping chosen for this vehicle's logs, reused for its next uploads. */
    columnMapping: json("column_mapping").$type<IngestMapping>(),
    notes: text("notes").notNull(),
    archivedAt: at("archived_at"),
    createdAt: createdAt(),
    updatedAt: createdAt("updated_at"),
  },
  (t) => [
    uniqueIndex("vehicles_team_identifier_unique").on(t.teamId, t.identifier),
    index("vehicles_team_idx").on(t.teamId),
  ],
);

/** One uploaded recording. The raw file stays in storage under `blobKey` (sha256 of its bytes). */
export const driveLogs = mysqlTable(
  "drive_logs",
  {
    id: id(),
    teamId: ref("team_id")
      .notNull()
      .references(() => teams.id, { onDelete: "cascade" }),
    vehicleId: ref("vehicle_id")
      .notNull()
      .references(() => vehicles.id, { onDelete: "cascade" }),
    fileName: varchar("file_name", { length: 255 }).notNull(),
    blobKey: varchar("blob_key", { length: 64 }).notNull(),
    sizeBytes: bigint("size_bytes", { mode: "number", unsigned: true }).notNull(),
    condition: mysqlEnum("condition", LOG_CONDITIONS).notNull(),
    gear: tinyint("gear"),
    damperVariant: varchar("damper_variant", { length: 80 }).notNull(),
    testDate: date("test_date", { mode: "string" }),
    notes: text("notes").notNull(),
    uploadedBy: ref("uploaded_by").references(() => users.id, { onDelete: "set null" }),
    uploadedAt: createdAt("uploaded_at"),
    status: mysqlEnum("status", LOG_STATES).notNull().default("queued"),
    /** Progress of the running analysis, 0–1, and its stage. */
    progress: double("progress").notNull().default(0),
    stage: varchar("stage", { length: 20 }),
    error: json("error").$type<LogError>(),
    latestAnalysisId: ref("latest_analysis_id"),
  },
  (t) => [
    index("drive_logs_vehicle_idx").on(t.vehicleId, t.uploadedAt),
    index("drive_logs_blob_idx").on(t.vehicleId, t.blobKey),
    index("drive_logs_team_idx").on(t.teamId),
  ],
);

/** A queued or running analysis of one drive log; claimed by any app instance. */
export const analysisJobs = mysqlTable(
  "analysis_jobs",
  {
    id: id(),
    teamId: ref("team_id").notNull(),
    driveLogId: ref("drive_log_id")
      .notNull()
      .references(() => driveLogs.id, { onDelete: "cascade" }),
    /** AnalysisOptions and the ingest mapping this job runs with. */
    settings: json("settings").$type<Record<string, unknown>>().notNull(),
    status: mysqlEnum("status", JOB_STATES).notNull().default("queued"),
    attempts: int("attempts", { unsigned: true }).notNull().default(0),
    claimedBy: varchar("claimed_by", { length: 64 }),
    heartbeatAt: at("heartbeat_at"),
    lastError: text("last_error"),
    createdAt: createdAt(),
    finishedAt: at("finished_at"),
    /** The re-analysis of a whole vehicle this job belongs to (app/lib/data/reanalysis-batch.server.ts). */
    batchId: varchar("batch_id", { length: 32 }),
  },
  (t) => [
    index("analysis_jobs_status_idx").on(t.status, t.id),
    index("analysis_jobs_batch_idx").on(t.batchId),
  ],
);

/** A finished analysis (versioned per drive log); the signal core's result JSON, compressed. */
export const analyses = mysqlTable(
  "analyses",
  {
    id: id(),
    teamId: ref("team_id").notNull(),
    driveLogId: ref("drive_log_id")
      .notNull()
      .references(() => driveLogs.id, { onDelete: "cascade" }),
    version: int("version", { unsigned: true }).notNull(),
    settings: json("settings").$type<Record<string, unknown>>().notNull(),
    firingOrder: double("firing_order").notNull(),
    isolationMinDb: double("isolation_min_db"),
    isolationMaxDb: double("isolation_max_db"),
    rpmMin: double("rpm_min"),
    rpmMax: double("rpm_max"),
    resonanceRpm: double("resonance_rpm"),
    resonanceDb: double("resonance_db"),
    rattleVerdict: mysqlEnum("rattle_verdict", ["ok", "over-limit"]),
    idleAngAccelRadS2: double("idle_ang_accel_rad_s2"),
    /** The two-mass model fit (result.model) and the start/stop events' largest peak amplification (dB), for the trend. */
    modelNaturalHz: double("model_natural_hz"),
    modelDampingRatio: double("model_damping_ratio"),
    eventPeakDb: double("event_peak_db"),
    /** The events' largest peak-to-peak twist, deg (result.events). */
    eventTwistPpDeg: double("event_twist_pp_deg"),
    warnings: json("warnings").$type<{ code: string; message: string }[]>().notNull(),
    /** gzip of the result JSON, served as it is on every read. */
    resultGz: mediumBlob("result_gz").notNull(),
    /** gzip of the order map (blocks × orders, both sides): only drawn, never queried. */
    orderMapGz: mediumBlob("order_map_gz").notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("analyses_log_version_unique").on(t.driveLogId, t.version)],
);

export const isolationPoints = mysqlTable(
  "isolation_points",
  {
    analysisId: ref("analysis_id")
      .notNull()
      .references(() => analyses.id, { onDelete: "cascade" }),
    rpm: double("rpm").notNull(),
    dB: double("db").notNull(),
    blocks: int("blocks", { unsigned: true }).notNull(),
    aboveNoise: boolean("above_noise").notNull(),
  },
  (t) => [primaryKey({ columns: [t.analysisId, t.rpm] })],
);

export const orderCurvePoints = mysqlTable(
  "order_curve_points",
  {
    analysisId: ref("analysis_id")
      .notNull()
      .references(() => analyses.id, { onDelete: "cascade" }),
    order: double("order_q").notNull(),
    rpm: double("rpm").notNull(),
    /** 0-peak angular-velocity amplitudes in rpm, as in the result JSON. */
    crankRpm: double("crank_rpm").notNull(),
    gearboxRpm: double("gearbox_rpm").notNull(),
    blocks: int("blocks", { unsigned: true }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.analysisId, t.order, t.rpm] })],
);

export const analysisSegments = mysqlTable(
  "analysis_segments",
  {
    analysisId: ref("analysis_id")
      .notNull()
      .references(() => analyses.id, { onDelete: "cascade" }),
    seq: smallint("seq", { unsigned: true }).notNull(),
    kind: mysqlEnum("kind", ["start", "idle", "steady", "run-up", "coast-down"]).notNull(),
    startS: double("start_s").notNull(),
    endS: double("end_s").notNull(),
    meanRpm: double("mean_rpm").notNull(),
  },
  (t) => [primaryKey({ columns: [t.analysisId, t.seq] })],
);
