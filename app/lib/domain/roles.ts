/** Roles inside a team, most powerful first (docs/architecture.md §2). */
export const ROLES = ["admin", "engineer", "technician", "viewer"] as const;
export type Role = (typeof ROLES)[number];

// Shared by server and browser: what each role may do (docs/architecture.md §2). Ranks compare roles:
// "at least engineer" admits engineers and admins.
const rank: Record<Role, number> = { admin: 4, engineer: 3, technician: 2, viewer: 1 };

export function atLeast(role: Role, needed: Role): boolean {
  return rank[role] >= rank[needed];
}

// What a role may do inside a team, for the pages' buttons and the ownership rule of share links.
// The role itself is checked, and a refusal worded, once per request by requireAccess
// (app/lib/http/access.server.ts); the data helpers apply only the ownership rules.

/** Engineers and admins make share links. */
export function canCreateShares(role: Role): boolean {
  return atLeast(role, "engineer");
}

/** The sharer (an engineer or admin) and the team's admins manage each share link. */
export function canManageShare(
  caller: { userId: number; role: Role },
  share: { createdBy: number | null },
): boolean {
  return (
    caller.role === "admin" || (canCreateShares(caller.role) && share.createdBy === caller.userId)
  );
}

/** Engineers and admins propose, decide and withdraw sign-offs (domain/signoff.ts adds four eyes). */
export function canSignOff(role: Role): boolean {
  return atLeast(role, "engineer");
}

/** Engineers and admins re-analyse all of a vehicle's drive logs at once (issue 17). */
export function canReanalyseAll(role: Role): boolean {
  return atLeast(role, "engineer");
}

/** Technicians and up write comments (viewers read them). */
export function canComment(role: Role): boolean {
  return atLeast(role, "technician");
}

export const roleLabels: Record<Role, string> = {
  admin: "Admin",
  engineer: "Engineer",
  technician: "Technician",
  viewer: "Viewer",
};

export const roleHints: Record<Role, string> = {
  admin: "Everything, plus members, invitations, roles, tokens and the audit log",
  engineer: "Vehicles, targets, upload, analyse, compare, share links",
  technician: "Upload drive logs and edit their test details; read everything",
  viewer: "Read only",
};
