import { redirect } from "react-router";
import { z } from "zod";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { setSessionTeam } from "~/lib/http/session.server";
import type { Route } from "./+types/team-switch";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { Invalid } from "~/lib/domain/errors";

const schema = z.object({ teamId: z.coerce.number().int().positive() });

/** POST /team/switch: choose the team this session works in (404 for a team one is not in). */
export const action = pageRoute(async ({ request }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const parsed = schema.safeParse(Object.fromEntries(form));
  if (!parsed.success) throw new Invalid("Choose a team from the list.");
  const { sessionId, team } = await requireAccess(request, "viewer", {
    teamId: parsed.data.teamId,
  });
  await setSessionTeam(sessionId, team.id);
  throw redirect("/vehicles");
});

export function loader() {
  return redirect("/team");
}
