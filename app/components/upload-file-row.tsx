import { useQuery } from "@tanstack/react-query";
import { Link } from "react-router";
import type { LogError } from "~/lib/domain/drive-log-terms";
import { linkClass } from "./form-fields";
import { canChooseColumns, errorText } from "./log-failure";
import { LogStatus, type LogProgress } from "./log-status";
import { MetadataFields, type Item } from "./upload-fields";
import { FINAL_REFUSALS, formatSize } from "./upload-format";

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
  const unsendable = item.phase === "unsendable";
  return (
    <fieldset
      className="rounded-lg border border-neutral-200 bg-white p-4"
      data-sendable={unsendable ? "false" : undefined}
    >
      <legend className="px-1 text-sm font-semibold">
        {item.file.name}{" "}
        <span className="font-normal text-neutral-500">· {formatSize(item.file.size)}</span>
        {unsendable ? (
          <span className="ml-2 rounded bg-red-50 px-1.5 py-0.5 text-xs font-medium text-red-800">
            Cannot be sent
          </span>
        ) : null}
      </legend>
      {editable ? <MetadataFields idPrefix={item.key} values={item} onChange={onChange} /> : null}
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
          {status?.status === "failed" ? (
            <FailureReason vehicleId={vehicleId} logId={item.logId} fileName={item.file.name} />
          ) : null}
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
      {editable || unsendable ? (
        <button type="button" onClick={onRemove} className={`mt-3 text-sm ${linkClass}`}>
          Remove<span className="sr-only"> {item.file.name}</span> from the list
        </button>
      ) : null}
    </fieldset>
  );
}

/**
 * Why a sent file's analysis failed, as the drive-log page says it (row, column, message), with a
 * link to the page's column choice when other columns or units may fix it.
 */
function FailureReason({
  vehicleId,
  logId,
  fileName,
}: {
  vehicleId: number;
  logId: number;
  fileName: string;
}) {
  // The status poll carries no reason; the log's API record does (the session cookie is enough).
  const query = useQuery({
    queryKey: ["drive-log-error", logId],
    queryFn: async (): Promise<LogError | null> => {
      const response = await fetch(`/api/v1/logs/${logId}`, {
        headers: { Accept: "application/json" },
      });
      if (!response.ok) throw new Error(`status ${response.status}`);
      return ((await response.json()) as { log: { error: LogError | null } }).log.error;
    },
    staleTime: Infinity,
  });
  const page = `/vehicles/${vehicleId}/logs/${logId}`;
  const error = query.data;
  if (!error) {
    return (
      <p className="text-neutral-700">
        {query.isError ? "The reason could not be fetched: " : "Reading the reason… "}
        <Link to={`${page}#failure-title`} className={linkClass}>
          see it on the drive log&apos;s page
        </Link>
        .
      </p>
    );
  }
  const reason = errorText(error);
  return (
    <p
      className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-red-900"
      data-error-code={error.code}
    >
      {fileName} could not be analysed. {reason}
      {/[.!?]$/.test(reason) ? " " : ". "}
      {canChooseColumns(error) ? (
        <Link to={`${page}#mapping-title`} className={linkClass}>
          Choose the columns<span className="sr-only"> of {fileName}</span>
        </Link>
      ) : (
        <Link to={`${page}#failure-title`} className={linkClass}>
          What to do<span className="sr-only"> about {fileName}</span>
        </Link>
      )}
    </p>
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
        error?: { code: string; message: string };
      } | null;
      if (xhr.status === 202 && json?.log) {
        resolve({ phase: "sent", sent: 1, logId: json.log.id, duplicateOf: json.log.duplicateOf });
      } else {
        resolve({
          // The same file again would be refused again: it leaves the count of files to send.
          phase: json?.error && FINAL_REFUSALS.has(json.error.code) ? "unsendable" : "refused",
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
