import { eq } from "drizzle-orm";
import type { MySql2Database } from "drizzle-orm/mysql2";
import { hashPassword } from "~/lib/infra/password.server";
import { memberships, teams, users, type Role } from "../lib/infra/db/schema";

/**
 * Demo data of an invented programme: "Kestrel Driveline Test", a made-up damper supplier's
 * test team with one account per role, and a second invented team so that team isolation can
 * be tried. Idempotent: rows that exist are left exactly as they are.
 */
export const DEMO_PASSWORD = "twistlog-demo";

export const DEMO_TEAMS = [
  {
    slug: "kestrel-driveline-test",
    name: "Kestrel Driveline Test",
    members: [
      { email: "admin@twistlog.test", name: "Ada Admin", role: "admin" },
      { email: "engineer@twistlog.test", name: "Erik Engineer", role: "engineer" },
      { email: "technician@twistlog.test", name: "Tomas Technician", role: "technician" },
      { email: "viewer@twistlog.test", name: "Vera Viewer", role: "viewer" },
    ],
  },
  {
    slug: "harrier-gearbox-rig",
    name: "Harrier Gearbox Rig",
    members: [{ email: "other@twistlog.test", name: "Otto Other", role: "engineer" }],
  },
] as const satisfies readonly {
  slug: string;
  name: string;
  members: readonly { email: string; name: string; role: Role }[];
}[];

/** Creates what is missing; returns how many rows it added (0 on a second run). */
export async function seedDemo(db: MySql2Database<Record<string, unknown>>): Promise<number> {
  let added = 0;
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  for (const demo of DEMO_TEAMS) {
    let [team] = await db.select({ id: teams.id }).from(teams).where(eq(teams.slug, demo.slug));
    if (!team) {
      [team] = await db.insert(teams).values({ name: demo.name, slug: demo.slug }).$returningId();
      added++;
    }
    for (const member of demo.members) {
      let [user] = await db
        .select({ id: users.id })
        .from(users)
        .where(eq(users.email, member.email));
      if (!user) {
        [user] = await db
          .insert(users)
          .values({ email: member.email, name: member.name, passwordHash })
          .$returningId();
        added++;
      }
      const [result] = await db
        .insert(memberships)
        .ignore()
        .values({ teamId: team!.id, userId: user!.id, role: member.role });
      added += result.affectedRows;
    }
  }
  return added;
}
