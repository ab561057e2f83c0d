import { ComingArea } from "~/components/coming-area";
import { requireUser } from "~/lib/permissions.server";
import type { Route } from "./+types/comparisons";
import { GeneralErrorBoundary } from "~/components/error-boundary";

export const meta = () => [{ title: "Comparisons · Twistlog" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request);
  return null;
}

export default function Comparisons() {
  return (
    <ComingArea
      title="Comparisons"
      text="Before-and-after comparisons of drive logs will be listed here once drive logs can be uploaded."
    />
  );
}

// Errors (403, 404, …) show inside the app's frame, with the header still there.
export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
