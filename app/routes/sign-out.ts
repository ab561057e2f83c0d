import { redirect } from "react-router";
import { audit } from "~/lib/data/audit.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { clientIp } from "~/lib/http/request.server";
import { endSession } from "~/lib/http/session.server";
import type { Route } from "./+types/sign-out";
import { getCurrentUser } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";

// Signing out changes state, so it is a POST with the CSRF token (a link could be forged).
export const action = pageRoute(async ({ request, context }: Route.ActionArgs) => {
  await assertCsrf(request, await readForm(request.clone()));
  const current = await getCurrentUser(request);
  if (current) {
    await audit({
      teamId: null,
      actor: { id: current.user.id, email: current.user.email },
      action: "sign-out",
      ip: clientIp(context),
    });
  }
  throw redirect("/sign-in?notice=signed-out", {
    headers: { "Set-Cookie": await endSession(request) },
  });
});

export function loader() {
  return redirect("/");
}
