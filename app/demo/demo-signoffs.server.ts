import { and, eq } from "drizzle-orm";
import type { SignoffInput } from "~/lib/domain/signoff";
import type { TargetInput } from "~/lib/domain/targets";
import type { Role } from "~/lib/domain/roles";
import { signoffData } from "~/lib/data/signoffs.server";
import { targetData } from "~/lib/data/targets.server";
import { db, pool } from "~/lib/infra/db.server";
import { databaseUnavailable, describeDbError } from "~/lib/infra/db-errors.server";
import { getEnv } from "~/lib/infra/env.server";
import { driveLogs, vehicles } from "../lib/infra/db/schema-drive-logs";
import { memberships, teams, users } from "../lib/infra/db/schema";
import { DEMO_TEAMS } from "./demo-seed.server";

/**
 * The demo's sign-offs (issue 16): on the Kestrel estate KST-D4, once the server has analysed its
 * sample drive logs (./demo-drive-logs.server.ts), one sign-off of damper A proposed by the demo
 * engineer and approved by the demo admin, and one of damper B proposed by the engineer and
 * waiting for approval — through the data layer, so the evidence and the PDF are real. The
 * targets are demo values of the invented Kestrel programme, chosen so that the sample logs meet
 * them (what the analysis of each sample gives is in the comments below); a claim the check does
 * not find passing is left out rather than approved.
 *
 * Idempotent and safe on several app instances at once: one instance at a time (a MariaDB named
 * lock), and nothing is done when the vehicle has any sign-off already (also one a user made) or
 * the demo team, its people or the vehicle are missing.
 */
const TEAM = DEMO_TEAMS[0];
const VEHICLE = "KST-D4";
const ENGINEER = "engineer@twistlog.test";
const ADMIN = "admin@twistlog.test";
const LOCK = "twistlog.demo-signoffs";
/** The audit log's "from" for the seed's steps. */
const FROM = "demo seed";

const LOGS = {
  idleA: "kestrel-kst-d4-idle-neutral-damper-a.csv",
  startA: "kestrel-kst-d4-engine-start-damper-a.csv",
  runUpA: "kestrel-kst-d4-runup-3rd-full-load-damper-a.csv",
  runUpB: "kestrel-kst-d4-runup-3rd-full-load-damper-b.csv",
} as const;
type LogKey = keyof typeof LOGS;

/**
 * The demo targets (invented programme values, plausible for an arc-spring dual-mass flywheel)
 * and which sample logs prove each for damper A. The samples' analyses give (npm run analyse):
 * idle 9.6 dB at 800 rpm; rattle 204 rad/s² at order 2, peak 222 rad/s²; run-up A at least
 * 16.6 dB over 1200–4000 rpm (B: 20.9 dB); the engine start's peak amplification 12.2 dB and the
 * largest twist 26.2° peak to peak against the 60° travel (margin 33.8°).
 */
const TARGETS: { input: TargetInput; proofA: LogKey[] }[] = [
  {
    input: {
      kind: "isolation",
      name: "Idle isolation",
      rpmFrom: 750,
      rpmTo: 850,
      minDb: 6,
      conditions: ["idle-neutral"],
      gears: [],
    },
    proofA: ["idleA"],
  },
  {
    input: {
      kind: "rattle",
      name: "Idle gear rattle",
      maxRadS2: 400,
      conditions: ["idle-neutral"],
      gears: [],
    },
    proofA: ["idleA"],
  },
  {
    input: {
      kind: "isolation",
      name: "Full-load run-up isolation",
      rpmFrom: 1200,
      rpmTo: 4000,
      minDb: 15,
      conditions: ["run-up"],
      gears: [],
    },
    proofA: ["runUpA"],
  },
  {
    input: {
      kind: "start-stop",
      name: "Start/stop resonance amplification",
      maxDb: 15,
      conditions: ["start-stop"],
      gears: [],
    },
    proofA: ["startA"],
  },
  {
    input: {
      kind: "twist-margin",
      name: "Start/stop twist margin",
      minMarginDeg: 20,
      conditions: ["start-stop"],
      gears: [],
    },
    proofA: ["startA"],
  },
];

export type DemoSignoffOutcome =
  /** Made now: one approved and one waiting sign-off. */
  | "seeded"
  /** The vehicle has sign-offs already: nothing to do. */
  | "present"
  /** No demo team, people, vehicle or sample logs: nothing to do. */
  | "no-demo"
  /** A sample log failed its analysis: nothing honest to sign off. */
  | "failed-logs"
  /** The analyses are still running, or another instance holds the lock: try again later. */
  | "waiting";

/** Seeds the demo sign-offs when everything they need is there; see the module's comment. */
export async function seedDemoSignoffs(): Promise<DemoSignoffOutcome> {
  const [team] = await db.select({ id: teams.id }).from(teams).where(eq(teams.slug, TEAM.slug));
  if (!team) return "no-demo";
  const people = await db
    .select({ id: users.id, email: users.email, role: memberships.role })
    .from(users)
    .innerJoin(memberships, eq(memberships.userId, users.id))
    .where(eq(memberships.teamId, team.id));
  const engineer = people.find((p) => p.email === ENGINEER);
  const admin = people.find((p) => p.email === ADMIN);
  const [vehicle] = await db
    .select({ id: vehicles.id })
    .from(vehicles)
    .where(and(eq(vehicles.teamId, team.id), eq(vehicles.identifier, VEHICLE)));
  if (!engineer || !admin || !vehicle) return "no-demo";

  const logs = await db
    .select({ id: driveLogs.id, fileName: driveLogs.fileName, status: driveLogs.status })
    .from(driveLogs)
    .where(eq(driveLogs.vehicleId, vehicle.id));
  const logOf = {} as Record<LogKey, (typeof logs)[number]>;
  for (const key of Object.keys(LOGS) as LogKey[]) {
    const log = logs.find((l) => l.fileName === LOGS[key]);
    if (!log) return "no-demo";
    logOf[key] = log;
  }
  const statuses = Object.values(logOf).map((l) => l.status);
  if (statuses.includes("failed")) return "failed-logs";
  if (statuses.some((s) => s !== "done")) return "waiting";

  const connection = await pool.getConnection();
  try {
    const [[lock]] = (await connection.query("SELECT GET_LOCK(?, 0) AS got", [LOCK])) as [
      { got: number | null }[],
      unknown,
    ];
    if (lock?.got !== 1) return "waiting";
    try {
      const signoffs = signoffData(team.id);
      if ((await signoffs.list({ vehicleId: vehicle.id })).length > 0) return "present";
      const targetIds = await demoTargets(team.id, vehicle.id, engineer.id);
      const asEngineer = { userId: engineer.id, role: engineer.role as Role, ip: FROM };
      const asAdmin = { userId: admin.id, role: admin.role as Role, ip: FROM };

      const a = await passingOnly(signoffs, vehicle.id, {
        damperVariant: "A",
        claims: TARGETS.map((t, i) => ({
          targetId: targetIds[i]!,
          logIds: t.proofA.map((key) => logOf[key].id),
        })),
        note: "Damper A on the Kestrel estate: idle in neutral, engine start and stop, and a full-load run-up in 3rd gear, each against the programme's targets. Released for the pilot build.",
      });
      if (a) {
        const proposed = await signoffs.propose(vehicle.id, a, asEngineer);
        await signoffs.approve(
          proposed.id,
          "Checked the run-up's least isolation near 1200 rpm and the start's twist margin; released.",
          asAdmin,
        );
      }
      const b = await passingOnly(signoffs, vehicle.id, {
        damperVariant: "B",
        claims: [{ targetId: targetIds[2]!, logIds: [logOf.runUpB.id] }],
        note: "Damper B (softer arc springs): the full-load run-up in 3rd gear isolates about 4 dB more than damper A. The idle and start/stop recordings of damper B follow; this sign-off claims the run-up only.",
      });
      if (b) await signoffs.propose(vehicle.id, b, asEngineer);
      return "seeded";
    } finally {
      await connection.query("SELECT RELEASE_LOCK(?)", [LOCK]);
    }
  } finally {
    connection.release();
  }
}

/** The demo targets' ids in TARGETS' order, creating the ones the vehicle lacks (by name). */
async function demoTargets(teamId: number, vehicleId: number, engineerId: number) {
  const data = targetData(teamId);
  const existing = await data.list(vehicleId);
  const ids: number[] = [];
  for (const { input } of TARGETS) {
    const found = existing.find((t) => t.name === input.name);
    ids.push(found ? found.id : await data.create(vehicleId, input, engineerId));
  }
  return ids;
}

/** The input with only the claims the check finds passing; null when none does. */
async function passingOnly(
  signoffs: ReturnType<typeof signoffData>,
  vehicleId: number,
  input: SignoffInput,
): Promise<SignoffInput | null> {
  const { checks } = await signoffs.check(vehicleId, input);
  const passing = new Set(checks.filter((c) => c.status === "pass").map((c) => c.targetId));
  const claims = input.claims.filter((c) => passing.has(c.targetId));
  if (claims.length < input.claims.length)
    console.warn(
      `demo sign-offs: ${input.claims.length - claims.length} claim(s) of damper ${input.damperVariant} left out: the sample logs do not pass them`,
    );
  return claims.length ? { ...input, claims } : null;
}

/**
 * Polls every few seconds until the demo sign-offs are seeded or not wanted, for at most
 * `forMs`; the timer never holds the process open. Returns a stop function.
 */
export function startDemoSignoffs({ everyMs = 3_000, forMs = 10 * 60_000 } = {}): () => void {
  const until = Date.now() + forMs;
  let timer: NodeJS.Timeout | undefined;
  let stopped = false;
  let lastError = "";
  const tick = async () => {
    let outcome: DemoSignoffOutcome | "error" = "error";
    try {
      outcome = await seedDemoSignoffs();
      if (outcome === "seeded")
        console.log(`demo sign-offs: one approved, one awaiting approval on ${VEHICLE}`);
    } catch (error) {
      // Said once per distinct failure (e.g. the database is down for a while): tried again.
      const down = databaseUnavailable(error);
      const message = down ? describeDbError(down, getEnv()) : (error as Error).message;
      if (message !== lastError) console.error(`demo sign-offs not made yet: ${message}`);
      lastError = message;
    }
    if (stopped || !["waiting", "error"].includes(outcome) || Date.now() > until) return;
    timer = setTimeout(() => void tick(), everyMs);
    timer.unref();
  };
  timer = setTimeout(() => void tick(), 0);
  timer.unref();
  return () => {
    stopped = true;
    clearTimeout(timer);
  };
}
