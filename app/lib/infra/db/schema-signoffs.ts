import {
  index,
  json,
  mysqlEnum,
  mysqlTable,
  primaryKey,
  text,
  varchar,
} from "drizzle-orm/mysql-core";
import { at, createdAt, id, mediumBlob, ref } from "./columns";
import { teams, users } from "./schema";
import { vehicles } from "./schema-drive-logs";
import {
  SIGNOFF_STATES,
  SIGNOFF_STEPS,
  type SignoffClaimInput,
  type SignoffDeviation,
} from "../../domain/signoff";

/**
 * A sign-off (docs/signoff.md): an engineer's claim that a vehicle's damper variant meets the
 * named targets, proven by named drive logs, and a second person's decision on it.
 *
 * What it rests on is frozen when it is proposed: `record` holds the canonical JSON of the
 * evidence (targets' values, drive logs with their raw files' SHA-256, analysis versions and
 * settings, verdicts, software version), `signoff_results` a byte copy of each analysis's stored
 * result. Approving adds the approval to the record, stores its SHA-256 as `digest` and the
 * evidence report's PDF (a blob of the store under `reportSha256`). Neither ever changes afterwards:
 * superseding and withdrawing only set the state, its reason and a history step.
 */
export const signoffs = mysqlTable(
  "signoffs",
  {
    id: id(),
    teamId: ref("team_id")
      .notNull()
      .references(() => teams.id, { onDelete: "cascade" }),
    vehicleId: ref("vehicle_id")
      .notNull()
      .references(() => vehicles.id, { onDelete: "cascade" }),
    damperVariant: varchar("damper_variant", { length: 80 }).notNull(),
    state: mysqlEnum("state", SIGNOFF_STATES).notNull().default("proposed"),
    /** As proposed: the claims and the recorded deviations (the record has them too). */
    claims: json("claims").$type<SignoffClaimInput[]>().notNull(),
    deviations: json("deviations").$type<SignoffDeviation[]>().notNull(),
    note: text("note").notNull(),
    /** The canonical JSON (RFC 8785) of the SignoffRecord: the evidence, then the approval. */
    record: mediumBlob("record").notNull(),
    proposedBy: ref("proposed_by").references(() => users.id, { onDelete: "set null" }),
    proposedAt: createdAt("proposed_at"),
    decidedBy: ref("decided_by").references(() => users.id, { onDelete: "set null" }),
    decidedAt: at("decided_at"),
    decisionComment: text("decision_comment"),
    /** SHA-256 (hex) of `record` once approved; null before. */
    digest: varchar("digest", { length: 64 }),
    /** The approved evidence report's SHA-256, which is also its key in the blob store. */
    reportSha256: varchar("report_sha256", { length: 64 }),
    /** Set when it is superseded or withdrawn; the state says which. */
    closedAt: at("closed_at"),
    closedReason: varchar("closed_reason", { length: 1000 }),
    closedBy: ref("closed_by").references(() => users.id, { onDelete: "set null" }),
  },
  (t) => [
    index("signoffs_vehicle_idx").on(t.vehicleId, t.damperVariant, t.proposedAt),
    index("signoffs_team_idx").on(t.teamId, t.state),
  ],
);

/**
 * A byte copy of each claimed drive log's analysis result (the analyses row's `result_gz`) and
 * the raw file's key, so the evidence outlives re-analysis and the drive log's deletion. The
 * storage sweep keeps every `blob_key` here (the raw file) as referenced.
 */
export const signoffResults = mysqlTable(
  "signoff_results",
  {
    signoffId: ref("signoff_id")
      .notNull()
      .references(() => signoffs.id, { onDelete: "cascade" }),
    /** The drive log's id when proposed; no foreign key: the log may be deleted later. */
    driveLogId: ref("drive_log_id").notNull(),
    analysisId: ref("analysis_id").notNull(),
    /** The raw file's SHA-256 = its key in the blob store. */
    blobKey: varchar("blob_key", { length: 64 }).notNull(),
    resultGz: mediumBlob("result_gz").notNull(),
  },
  (t) => [
    primaryKey({ columns: [t.signoffId, t.driveLogId] }),
    index("signoff_results_blob_idx").on(t.blobKey),
  ],
);

/** Every step of a sign-off, in order: proposed, approved, rejected, superseded, withdrawn. */
export const signoffSteps = mysqlTable(
  "signoff_steps",
  {
    id: id(),
    signoffId: ref("signoff_id")
      .notNull()
      .references(() => signoffs.id, { onDelete: "cascade" }),
    step: mysqlEnum("step", SIGNOFF_STEPS).notNull(),
    actorUserId: ref("actor_user_id").references(() => users.id, { onDelete: "set null" }),
    /** Who, as shown when it happened (name and e-mail), or "Twistlog" for a supersede. */
    actorName: varchar("actor_name", { length: 120 }).notNull(),
    actorEmail: varchar("actor_email", { length: 254 }).notNull(),
    text: text("text").notNull(),
    at: createdAt("at"),
  },
  (t) => [index("signoff_steps_signoff_idx").on(t.signoffId, t.id)],
);
