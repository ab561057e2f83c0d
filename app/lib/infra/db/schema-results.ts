import {
  boolean,
  double,
  index,
  int,
  json,
  mysqlEnum,
  mysqlTable,
  text,
  tinyint,
  uniqueIndex,
  varchar,
} from "drizzle-orm/mysql-core";
import { at, createdAt, id, ref } from "./columns";
import { teams, users } from "./schema";
import { driveLogs, vehicles } from "./schema-drive-logs";
import type { LogCondition } from "../../domain/drive-log-terms";
import { TARGET_KINDS } from "../../domain/target-kinds";

export { TARGET_KINDS, type TargetKind } from "../../domain/target-kinds";

/**
 * A programme pass/fail limit of a vehicle (docs/architecture.md §3 "target"). Isolation targets hold a
 * minimum isolation at the firing order over an engine-speed range; rattle targets a maximum
 * gearbox-input angular acceleration at idle. Empty `conditions` / `gears` mean "every log".
 */
export const targets = mysqlTable(
  "targets",
  {
    id: id(),
    teamId: ref("team_id")
      .notNull()
      .references(() => teams.id, { onDelete: "cascade" }),
    vehicleId: ref("vehicle_id")
      .notNull()
      .references(() => vehicles.id, { onDelete: "cascade" }),
    kind: mysqlEnum("kind", TARGET_KINDS).notNull(),
    name: varchar("name", { length: 120 }).notNull(),
    /** Isolation targets: the engine-speed range, rpm, and the minimum isolation, dB. */
    rpmFrom: double("rpm_from"),
    rpmTo: double("rpm_to"),
    minDb: double("min_db"),
    /** Rattle targets: the maximum gearbox-input angular acceleration, rad/s². */
    maxRadS2: double("max_rad_s2"),
    /** Start-stop targets: the largest peak amplification through the resonance, dB. */
    maxDb: double("max_db"),
    /** Twist-margin targets: the least margin of the start/stop twist to the travel limit, deg. */
    minMarginDeg: double("min_margin_deg"),
    conditions: json("conditions").$type<LogCondition[]>().notNull(),
    gears: json("gears").$type<number[]>().notNull(),
    createdBy: ref("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: createdAt("updated_at"),
  },
  (t) => [index("targets_vehicle_idx").on(t.vehicleId)],
);

export const SHARE_KINDS = ["log", "comparison", "signoff"] as const;
export type ShareKind = (typeof SHARE_KINDS)[number];

/**
 * A read-only link to one drive log's results or one comparison, for someone without an
 * account. Only the sha256 of the token is stored; the token itself is shown once.
 */
export const shares = mysqlTable(
  "shares",
  {
    id: id(),
    teamId: ref("team_id")
      .notNull()
      .references(() => teams.id, { onDelete: "cascade" }),
    vehicleId: ref("vehicle_id")
      .notNull()
      .references(() => vehicles.id, { onDelete: "cascade" }),
    kind: mysqlEnum("kind", SHARE_KINDS).notNull(),
    /** kind "log": the drive log shared. */
    driveLogId: ref("drive_log_id").references(() => driveLogs.id, { onDelete: "cascade" }),
    /** kind "comparison": the drive logs compared, in the order shown. */
    logIds: json("log_ids").$type<number[]>().notNull(),
    /** kind "signoff": the sign-off shared (its evidence and report, read only; issue 16). */
    signoffId: ref("signoff_id"),
    tokenHash: varchar("token_hash", { length: 64 }).notNull(),
    note: text("note").notNull(),
    allowRawDownload: boolean("allow_raw_download").notNull().default(false),
    createdBy: ref("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    expiresAt: at("expires_at").notNull(),
    revokedAt: at("revoked_at"),
    viewCount: int("view_count", { unsigned: true }).notNull().default(0),
    lastViewedAt: at("last_viewed_at"),
  },
  (t) => [
    uniqueIndex("shares_token_unique").on(t.tokenHash),
    index("shares_team_idx").on(t.teamId, t.createdAt),
  ],
);

/** One opening of a share link: the time only, nothing about the person. */
export const shareViews = mysqlTable(
  "share_views",
  {
    id: id(),
    shareId: ref("share_id")
      .notNull()
      .references(() => shares.id, { onDelete: "cascade" }),
    viewedAt: createdAt("viewed_at"),
  },
  (t) => [index("share_views_share_idx").on(t.shareId, t.viewedAt)],
);

/**
 * A remark on a drive log or a comparison, optionally pinned to a time (s) or an engine speed
 * (rpm) and drawn as a marker on the charts. `subjectKey` is "log:ID" or "compare:ID,ID…" with
 * the ids sorted, so a comparison's comments follow it whatever order its URL lists.
 */
export const comments = mysqlTable(
  "comments",
  {
    id: id(),
    teamId: ref("team_id")
      .notNull()
      .references(() => teams.id, { onDelete: "cascade" }),
    vehicleId: ref("vehicle_id")
      .notNull()
      .references(() => vehicles.id, { onDelete: "cascade" }),
    subjectKey: varchar("subject_key", { length: 200 }).notNull(),
    authorId: ref("author_id").references(() => users.id, { onDelete: "set null" }),
    body: text("body").notNull(),
    pinTimeS: double("pin_time_s"),
    pinRpm: double("pin_rpm"),
    /** 1 when the comment was edited after posting. */
    edited: tinyint("edited").notNull().default(0),
    createdAt: createdAt(),
    deletedAt: at("deleted_at"),
  },
  (t) => [index("comments_subject_idx").on(t.teamId, t.subjectKey, t.createdAt)],
);
