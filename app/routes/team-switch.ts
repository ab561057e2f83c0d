import { redirect } from "react-router";
import { z } from "zod";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { invariantResponse, requireRole } from "~/lib/http/permissions.server";
import { setSessionTeam } from "~/lib/http/session.server";
import type { Route } from "./+types/team-switch";

const schema = z.object({ teamId: z.coerce.number().int().positive() });

/** POST /team/switch: choose the team this session works in (404 for a team one is not in). */
export async function action({ request }: Route.ActionArgs) {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const parsed = schema.safeParse(Object.fromEntries(form));
  invariantResponse(parsed.success, "Choose a team from the list.", { status: 400 });
  const { sessionId, team } = await requireRole(request, parsed.data.teamId, "viewer");
  await setSessionTeam(sessionId, team.id);
  throw redirect("/vehicles");
}

export function loader() {
  return redirect("/team");
}
