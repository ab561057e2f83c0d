import { conditionLabels, gearLabel, type LogCondition } from "~/lib/domain/drive-log-terms";
import { linkClass } from "./form-fields";
import { InlineTerm, When } from "./page";

/** A drive log another one can be compared with (the drive-log page's "Compare with…"). */
export interface CompareCandidate {
  id: number;
  label: string;
  fileName: string;
}

/**
 * The drive-log page's header: the file, its test details, the live analysis status, the
 * downloads and "Compare with…", and the driver's notes.
 */
export function DriveLogHeader({
  vehicle,
  log,
  status,
  downloads,
  others,
}: {
  vehicle: { id: number; name: string };
  log: {
    id: number;
    fileName: string;
    condition: LogCondition;
    gear: number | null;
    damperVariant: string;
    testDate: string | null;
    uploadedAt: Date | string;
    uploadedBy: string;
    notes: string | null;
  };
  /** The analysis status, kept live by the page. */
  status: React.ReactNode;
  /** Offer the result JSON and CSV (the latest analysis is shown). */
  downloads: boolean;
  /** Drive logs to compare with; none when there is no analysis to compare. */
  others: CompareCandidate[];
}) {
  return (
    <header className="flex flex-wrap items-start justify-between gap-4">
      <div className="min-w-0">
        <h1 className="text-2xl font-semibold tracking-tight break-all">{log.fileName}</h1>
        <dl className="mt-3 flex flex-wrap gap-x-6 gap-y-1 text-sm">
          <InlineTerm term="Vehicle">{vehicle.name}</InlineTerm>
          <InlineTerm term="Condition">{conditionLabels[log.condition]}</InlineTerm>
          <InlineTerm term="Gear">{gearLabel(log.gear)}</InlineTerm>
          <InlineTerm term="Damper variant">{log.damperVariant}</InlineTerm>
          <InlineTerm term="Test date">
            {log.testDate ? <When date={log.testDate} dateOnly /> : "—"}
          </InlineTerm>
          <InlineTerm term="Uploaded">
            <When date={log.uploadedAt} /> by {log.uploadedBy}
          </InlineTerm>
        </dl>
        <div className="mt-3 flex flex-wrap items-center gap-x-4 gap-y-2 text-sm">
          {status}
          <a href={`/vehicles/${vehicle.id}/logs/${log.id}/file`} className={linkClass} download>
            Download the raw file
          </a>
          {downloads ? (
            <>
              <a
                href={`/api/v1/logs/${log.id}/result`}
                className={linkClass}
                download={`drive-log-${log.id}-result.json`}
              >
                Result JSON
              </a>
              <a
                href={`/vehicles/${vehicle.id}/logs/${log.id}/result.csv`}
                className={linkClass}
                download
              >
                Result CSV
              </a>
            </>
          ) : null}
          {others.length ? (
            <CompareWith vehicleId={vehicle.id} logId={log.id} others={others} />
          ) : null}
        </div>
        {log.notes ? (
          <p className="mt-2 max-w-3xl text-sm text-neutral-700 whitespace-pre-line">
            Driver notes: {log.notes}
          </p>
        ) : null}
      </div>
    </header>
  );
}

/** "Compare with…": pick another analysed drive log of the vehicle and open the comparison. */
function CompareWith({
  vehicleId,
  logId,
  others,
}: {
  vehicleId: number;
  logId: number;
  others: CompareCandidate[];
}) {
  return (
    <form
      method="get"
      action={`/vehicles/${vehicleId}/compare`}
      className="flex flex-wrap items-center gap-2"
    >
      <input type="hidden" name="logs" value={String(logId)} />
      <label htmlFor="compare-with" className="text-neutral-600">
        Compare with
      </label>
      <select
        id="compare-with"
        name="with"
        required
        className="max-w-64 rounded-md border border-neutral-300 px-2 py-1 text-sm sm:max-w-72"
        defaultValue=""
      >
        <option value="" disabled>
          choose a drive log…
        </option>
        {others.map((o) => (
          <option key={o.id} value={o.id}>
            {o.label} ({o.fileName})
          </option>
        ))}
      </select>
      <button
        type="submit"
        className="rounded-md border border-neutral-300 px-2 py-1 text-sm hover:bg-neutral-50"
      >
        Compare
      </button>
    </form>
  );
}
