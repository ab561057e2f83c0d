import { Link } from "react-router";
import { linkClass } from "./form-fields";
import { Card, When } from "./page";

/** One analysis version as the drive-log page lists it (vehicleData().versions()). */
export interface VersionRow {
  id: number;
  version: number;
  createdAt: Date | string;
  firingOrder: number;
  revsPerBlock: number | null;
  binRpm: number | null;
}

/** "firing order 2, 8 revolutions per block, 50 rpm bins": what a re-analysis may change. */
export function settingsText(v: VersionRow): string {
  return [
    `firing order ${v.firingOrder}`,
    v.revsPerBlock === null
      ? null
      : `${v.revsPerBlock} ${v.revsPerBlock === 1 ? "revolution" : "revolutions"} per block`,
    v.binRpm === null ? null : `${v.binRpm} rpm bins`,
  ]
    .filter(Boolean)
    .join(", ");
}

/** The address of one version: the latest is the page itself, an earlier one ?analysis=<id>. */
export function versionHref(logHref: string, v: VersionRow, latest: VersionRow | undefined) {
  return v.id === latest?.id ? logHref : `${logHref}?analysis=${v.id}`;
}

/** Above the figures of an earlier version: which one this is, and the way back to the latest. */
export function EarlierVersionNote({
  shown,
  latest,
  logHref,
}: {
  shown: VersionRow;
  latest: VersionRow;
  logHref: string;
}) {
  return (
    <div
      role="note"
      data-earlier-version={shown.version}
      className="rounded-md border border-indigo-200 bg-indigo-50 px-4 py-3 text-sm text-indigo-950"
    >
      <p>
        <strong>An earlier analysis, read only.</strong> You are looking at version {shown.version}{" "}
        of {latest.version}, made <When date={shown.createdAt} /> with {settingsText(shown)}. A
        newer version exists: version {latest.version}, made <When date={latest.createdAt} />.
      </p>
      <p className="mt-2">
        <Link to={logHref} className={linkClass}>
          See the latest analysis (version {latest.version})
        </Link>
      </p>
    </div>
  );
}

/** Every version of the drive log, each a link to its figures; the one on screen is marked. */
export function AnalysisVersions({
  versions,
  shownId,
  logHref,
}: {
  versions: VersionRow[];
  shownId: number | undefined;
  logHref: string;
}) {
  const latest = versions[0];
  return (
    <Card title="Analysis versions" id="versions">
      <ul className="space-y-2 text-sm">
        {versions.map((v) => {
          const label = (
            <>
              Version {v.version}, made <When date={v.createdAt} />
            </>
          );
          return (
            <li key={v.id}>
              {v.id === shownId ? (
                <span aria-current="page" className="font-medium">
                  {label}
                </span>
              ) : (
                <Link to={versionHref(logHref, v, latest)} className={linkClass}>
                  {label}
                </Link>
              )}
              {v.id === latest?.id ? " (latest)" : ""}
              {v.id === shownId ? " (shown)" : ""}
              <span className="block text-neutral-600">{settingsText(v)}</span>
            </li>
          );
        })}
      </ul>
    </Card>
  );
}
