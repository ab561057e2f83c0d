import {
  boolean,
  smallint,
  index,
  json,
  mysqlEnum,
  mysqlTable,
  uniqueIndex,
  varchar,
} from "drizzle-orm/mysql-core";
import type { ChannelName } from "../../signal/types";
import { ROLES, type Role } from "../../domain/roles";
import { SIGNOFF_APPROVERS } from "../../domain/signoff";
import { at, createdAt, id, ref } from "./columns";

// Secrets that travel in links, cookies or headers are stored only as their sha256 (hex).
const tokenHash = () => varchar("token_hash", { length: 64 }).notNull();

export { ROLES, type Role };
const role = () => mysqlEnum("role", ROLES).notNull();

/** A team (workspace): owns its vehicles, drive logs and results. */
export const teams = mysqlTable(
  "teams",
  {
    id: id(),
    name: varchar("name", { length: 120 }).notNull(),
    slug: varchar("slug", { length: 64 }).notNull(),
    // How angular-velocity amplitudes are shown to this team (stored values are rad/s).
    amplitudeUnit: mysqlEnum("amplitude_unit", ["rpm", "rad/s"]).notNull().default("rpm"),
    // The team's own logger channel names (app/lib/domain/channel-names.ts); null: none yet.
    channelNames: json("channel_names").$type<ChannelName[]>(),
    // Refuse logs with dropouts, gaps or jitter instead of repairing them (issue 14).
    strictIngest: boolean("strict_ingest").notNull().default(false),
    // The engine speed at which the damper-health trend reads the isolation, rpm (issue 15).
    trendReferenceRpm: smallint("trend_reference_rpm", { unsigned: true }).notNull().default(1500),
    // Who approves sign-offs besides never their proposer (issue 16, domain/signoff.ts).
    signoffApprovers: mysqlEnum("signoff_approvers", SIGNOFF_APPROVERS)
      .notNull()
      .default("engineers"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("teams_slug_unique").on(t.slug)],
);

export const users = mysqlTable(
  "users",
  {
    id: id(),
    // Always stored lower-case and trimmed (app/lib/domain/validation.ts).
    email: varchar("email", { length: 254 }).notNull(),
    name: varchar("name", { length: 120 }).notNull(),
    passwordHash: varchar("password_hash", { length: 255 }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("users_email_unique").on(t.email)],
);

/** A user's place in a team, with one role there. */
export const memberships = mysqlTable(
  "memberships",
  {
    id: id(),
    teamId: ref("team_id")
      .notNull()
      .references(() => teams.id, { onDelete: "cascade" }),
    userId: ref("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    role: role(),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("memberships_team_user_unique").on(t.teamId, t.userId),
    index("memberships_user_idx").on(t.userId),
  ],
);

/** A signed-in browser session. The cookie carries the secret; `id` is its sha256. */
export const sessions = mysqlTable(
  "sessions",
  {
    id: varchar("id", { length: 64 }).primaryKey(),
    userId: ref("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    // The team chosen in the team switcher; null until the user has a team.
    teamId: ref("team_id").references(() => teams.id, { onDelete: "set null" }),
    ip: varchar("ip", { length: 45 }).notNull().default(""),
    userAgent: varchar("user_agent", { length: 255 }).notNull().default(""),
    expiresAt: at("expires_at").notNull(),
    createdAt: createdAt(),
  },
  (t) => [index("sessions_user_idx").on(t.userId)],
);

/** An e-mailed invitation to join a team with a role: single use, expires. */
export const invitations = mysqlTable(
  "invitations",
  {
    id: id(),
    teamId: ref("team_id")
      .notNull()
      .references(() => teams.id, { onDelete: "cascade" }),
    email: varchar("email", { length: 254 }).notNull(),
    role: role(),
    tokenHash: tokenHash(),
    invitedBy: ref("invited_by").references(() => users.id, { onDelete: "set null" }),
    expiresAt: at("expires_at").notNull(),
    acceptedAt: at("accepted_at"),
    revokedAt: at("revoked_at"),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("invitations_token_unique").on(t.tokenHash),
    index("invitations_team_idx").on(t.teamId),
  ],
);

/** A password-reset link: single use, 30 minutes. */
export const passwordResets = mysqlTable(
  "password_resets",
  {
    id: id(),
    userId: ref("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    tokenHash: tokenHash(),
    expiresAt: at("expires_at").notNull(),
    usedAt: at("used_at"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("password_resets_token_unique").on(t.tokenHash)],
);

/** A personal API token for scripts: acts with its owner's role in one team. */
export const apiTokens = mysqlTable(
  "api_tokens",
  {
    id: id(),
    userId: ref("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    teamId: ref("team_id")
      .notNull()
      .references(() => teams.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 80 }).notNull(),
    tokenHash: tokenHash(),
    // The first characters of the token, shown in lists so a user can tell tokens apart.
    prefix: varchar("prefix", { length: 16 }).notNull(),
    expiresAt: at("expires_at"),
    lastUsedAt: at("last_used_at"),
    revokedAt: at("revoked_at"),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("api_tokens_token_unique").on(t.tokenHash),
    index("api_tokens_user_idx").on(t.userId),
  ],
);

/** One failed sign-in, kept in the database so throttling survives a restart. */
export const signInFailures = mysqlTable(
  "sign_in_failures",
  {
    id: id(),
    email: varchar("email", { length: 254 }).notNull(),
    ip: varchar("ip", { length: 45 }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [
    index("sign_in_failures_email_idx").on(t.email, t.createdAt),
    index("sign_in_failures_ip_idx").on(t.ip, t.createdAt),
  ],
);

/**
 * Who did what, when, from where. `teamId` is null for events of a person rather than a team
 * (sign-ins); team admins see those of their members.
 */
export const auditEvents = mysqlTable(
  "audit_events",
  {
    id: id(),
    teamId: ref("team_id").references(() => teams.id, { onDelete: "cascade" }),
    actorUserId: ref("actor_user_id").references(() => users.id, { onDelete: "set null" }),
    actorEmail: varchar("actor_email", { length: 254 }).notNull(),
    action: varchar("action", { length: 40 }).notNull(),
    detail: varchar("detail", { length: 500 }).notNull().default(""),
    ip: varchar("ip", { length: 45 }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [
    index("audit_events_team_idx").on(t.teamId, t.createdAt),
    index("audit_events_actor_idx").on(t.actorUserId, t.createdAt),
  ],
);
