import { Link } from "react-router";
import { countText, plural } from "~/lib/base/plural";
import { linkClass } from "./form-fields";
import { Notice } from "./page";

/**
 * After a form upload without JavaScript (the vehicle page's ?uploaded=…&dup=…): how many drive
 * logs were uploaded, and each one whose file was uploaded before, with a link to the earlier one.
 */
export function UploadNotices({
  vehicleId,
  uploaded,
  duplicates,
}: {
  vehicleId: number;
  uploaded: number[];
  /** [new drive log, the earlier one with the same file]. */
  duplicates: [number, number][];
}) {
  return (
    <>
      {uploaded.length ? (
        <Notice>
          {countText(uploaded.length, "drive log")} uploaded;{" "}
          {plural(uploaded.length, "its analysis runs", "their analyses run")} in the background.
        </Notice>
      ) : null}
      {duplicates.map(([id, earlier]) => (
        <p
          key={id}
          className="rounded-md border border-amber-500 bg-amber-50 px-4 py-2 text-sm text-amber-950"
        >
          Drive log {id}: the same file was uploaded before as drive log {earlier} —{" "}
          <Link to={`/vehicles/${vehicleId}/logs/${earlier}`} className={linkClass}>
            open it
          </Link>
          .
        </p>
      ))}
    </>
  );
}

/**
 * How the vehicle's analyses progress: each change announced to screen readers, and without
 * JavaScript (no live status) a hint to reload while analyses run.
 */
export function ProgressNotes({
  vehicleId,
  announcement,
  running,
}: {
  vehicleId: number;
  announcement: string;
  /** Some drive log is queued or being analysed. */
  running: boolean;
}) {
  return (
    <>
      <p role="status" aria-live="polite" className="sr-only">
        {announcement}
      </p>
      {running ? (
        <noscript>
          <p className="text-sm text-neutral-700">
            Analyses are running.{" "}
            <a href={`/vehicles/${vehicleId}`} className={linkClass}>
              Reload the page
            </a>{" "}
            to see how far they are.
          </p>
        </noscript>
      ) : null}
    </>
  );
}
