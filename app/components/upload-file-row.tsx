import { Link } from "react-router";
import { linkClass } from "./form-fields";
import { LogStatus, type LogProgress } from "./log-status";
import { MetadataFields, type Item } from "./upload-fields";
import { formatSize } from "./upload-format";

/** One chosen file: its test details until it is sent, then its upload and analysis progress. */
export function FileRow({
  item,
  vehicleId,
  status,
  onChange,
  onRemove,
}: {
  item: Item;
  vehicleId: number;
  status: LogProgress | undefined;
  onChange: (change: Partial<Item>) => void;
  onRemove: () => void;
}) {
  const editable = item.phase === "ready" || item.phase === "refused";
  return (
    <fieldset className="rounded-lg border border-neutral-200 bg-white p-4">
      <legend className="px-1 text-sm font-semibold">
        {item.file.name}{" "}
        <span className="font-normal text-neutral-500">· {formatSize(item.file.size)}</span>
      </legend>
      {editable ? (
        <>
          <MetadataFields idPrefix={item.key} values={item} onChange={onChange} />
          <button type="button" onClick={onRemove} className={`mt-3 text-sm ${linkClass}`}>
            Remove<span className="sr-only"> {item.file.name}</span> from the list
          </button>
        </>
      ) : null}
      {item.phase === "uploading" ? (
        <div className="mt-1">
          <div className="flex justify-between text-xs text-neutral-700">
            <span>Uploading</span>
            <span>{Math.round(item.sent * 100)} %</span>
          </div>
          <progress
            className="mt-1 h-1.5 w-full accent-indigo-600"
            max={100}
            value={Math.round(item.sent * 100)}
            aria-label={`Upload of ${item.file.name}`}
          />
        </div>
      ) : null}
      {item.phase === "sent" && item.logId ? (
        <div className="mt-1 space-y-2 text-sm">
          <div className="flex flex-wrap items-center gap-3">
            <span>
              Uploaded as{" "}
              <Link to={`/vehicles/${vehicleId}/logs/${item.logId}`} className={linkClass}>
                drive log {item.logId}
              </Link>
            </span>
            <LogStatus
              log={status ?? { id: item.logId, status: "queued", progress: 0, stage: null }}
              label={item.file.name}
            />
          </div>
          {item.duplicateOf ? (
            <p className="rounded-md border border-amber-500 bg-amber-50 px-3 py-2 text-amber-950">
              The same file was uploaded before as drive log {item.duplicateOf} —{" "}
              <Link to={`/vehicles/${vehicleId}/logs/${item.duplicateOf}`} className={linkClass}>
                open it
              </Link>
              .
            </p>
          ) : null}
        </div>
      ) : null}
      {item.message ? (
        <p
          role="alert"
          className="mt-2 rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800"
        >
          {item.message}
        </p>
      ) : null}
    </fieldset>
  );
}

/** Sends one file with its test details; resolves with what the row should show next. */

export function send(
  vehicleId: number,
  item: Item,
  onSent: (fraction: number) => void,
): Promise<Partial<Item>> {
  const body = new FormData();
  // Test details first, the file last: the server reads them before the file streams in.
  body.set("condition", item.condition);
  if (item.gear.trim()) body.set("gear", item.gear.trim());
  if (item.damperVariant.trim()) body.set("damperVariant", item.damperVariant.trim());
  if (item.testDate) body.set("testDate", item.testDate);
  body.set("notes", item.notes);
  body.set("file", item.file, item.file.name);
  return new Promise((resolve) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", `/api/v1/vehicles/${vehicleId}/logs`);
    xhr.responseType = "json";
    xhr.upload.onprogress = (e) => e.lengthComputable && onSent(e.loaded / e.total);
    xhr.onload = () => {
      const json = xhr.response as {
        log?: { id: number; duplicateOf: number | null };
        error?: { message: string };
      } | null;
      if (xhr.status === 202 && json?.log) {
        resolve({ phase: "sent", sent: 1, logId: json.log.id, duplicateOf: json.log.duplicateOf });
      } else {
        resolve({
          phase: "refused",
          message: `${item.file.name} was not accepted: ${json?.error?.message ?? `the server answered ${xhr.status}`}`,
        });
      }
    };
    xhr.onerror = () =>
      resolve({
        phase: "refused",
        message: `${item.file.name} could not be sent: the connection failed. Try again.`,
      });
    xhr.send(body);
  });
}
