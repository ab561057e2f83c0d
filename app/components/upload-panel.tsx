import { useRef, useState } from "react";
import { linkClass } from "./form-fields";
import type { LogProgress } from "./log-status";
import { FileRow, send } from "./upload-file-row";
import { PlainUpload, primaryButton, type Item } from "./upload-fields";
import { refusalOf } from "./upload-format";
import { useHydrated } from "./use-hydrated";

/**
 * The upload panel. Before the page's JavaScript runs it is a plain multipart form posting to
 * the vehicle page's action (one set of test details for all files). With JavaScript each file
 * gets its own test details and is sent on its own to POST /api/v1/vehicles/:id/logs, with
 * XMLHttpRequest for its upload progress.
 */
export function UploadPanel(props: {
  vehicleId: number;
  damperVariant: string;
  statuses: Map<number, LogProgress>;
  onUploaded: () => void;
}) {
  const hydrated = useHydrated();
  return hydrated ? <EnhancedUpload {...props} /> : <PlainUpload {...props} />;
}

function EnhancedUpload({
  vehicleId,
  damperVariant,
  statuses,
  onUploaded,
}: {
  vehicleId: number;
  damperVariant: string;
  statuses: Map<number, LogProgress>;
  onUploaded: () => void;
}) {
  const [items, setItems] = useState<Item[]>([]);
  const [dragging, setDragging] = useState(false);
  const [busy, setBusy] = useState(false);
  const input = useRef<HTMLInputElement>(null);
  const counter = useRef(0);

  const patch = (key: string, change: Partial<Item>) =>
    setItems((all) => all.map((i) => (i.key === key ? { ...i, ...change } : i)));

  async function add(chosen: FileList | File[]) {
    const files = [...chosen]; // before the input is reset
    // An empty or binary file would only be refused: it is listed with the reason, never counted.
    const refusals = await Promise.all(files.map((f) => refusalOf(f).catch(() => null)));
    const added = files.map((file, i): Item => ({
      key: `f${counter.current++}`,
      file,
      condition: "other",
      gear: "",
      damperVariant,
      testDate: "",
      notes: "",
      phase: refusals[i] ? "unsendable" : "ready",
      sent: 0,
      message: refusals[i] ?? undefined,
    }));
    setItems((all) => [...all, ...added]);
  }

  async function uploadAll() {
    setBusy(true);
    // One file after the other: each gets its own request, and the server's queue is not flooded.
    for (const item of items.filter((i) => i.phase === "ready" || i.phase === "refused")) {
      patch(item.key, { phase: "uploading", sent: 0, message: undefined });
      const outcome = await send(vehicleId, item, (sent) => patch(item.key, { sent }));
      patch(item.key, outcome);
      if (outcome.phase === "sent") onUploaded();
    }
    setBusy(false);
  }

  const pending = items.filter((i) => i.phase === "ready" || i.phase === "refused").length;
  const unsendable = items.filter((i) => i.phase === "unsendable").length;
  const waiting = pending > 0;
  return (
    <div className="space-y-4">
      <div
        onDragOver={(e) => {
          e.preventDefault();
          setDragging(true);
        }}
        onDragLeave={() => setDragging(false)}
        onDrop={(e) => {
          e.preventDefault();
          setDragging(false);
          void add(e.dataTransfer.files);
        }}
        className={`rounded-lg border-2 border-dashed px-6 py-8 text-center ${
          dragging ? "border-indigo-600 bg-indigo-50" : "border-neutral-300 bg-neutral-50"
        }`}
      >
        <p className="text-sm text-neutral-700">Drop drive log files (CSV or ASAM MDF4) here, or</p>
        <label
          htmlFor="upload-files"
          className="mt-2 inline-flex cursor-pointer rounded-md border border-neutral-300 bg-white px-3 py-1.5 text-sm font-medium text-neutral-800 hover:bg-neutral-50 has-[:focus-visible]:outline-2 has-[:focus-visible]:outline-offset-2 has-[:focus-visible]:outline-indigo-600"
        >
          Choose files
          <input
            ref={input}
            id="upload-files"
            type="file"
            multiple
            accept=".csv,.txt,.tsv,.mf4,.mdf,text/csv,text/plain"
            className="sr-only"
            onChange={(e) => {
              if (e.target.files) void add(e.target.files);
              e.target.value = "";
            }}
          />
        </label>
        <p className="mt-2 text-xs text-neutral-500">
          Several files at once; each keeps its own test details.
        </p>
      </div>
      {items.map((item) => (
        <FileRow
          key={item.key}
          item={item}
          vehicleId={vehicleId}
          status={item.logId ? statuses.get(item.logId) : undefined}
          onChange={(change) => patch(item.key, change)}
          onRemove={() => setItems((all) => all.filter((i) => i.key !== item.key))}
        />
      ))}
      {items.length > 0 ? (
        <div className="flex flex-wrap items-center gap-4">
          {busy || waiting ? (
            <button
              type="button"
              className={primaryButton}
              disabled={busy}
              onClick={() => void uploadAll()}
              aria-describedby={unsendable ? "upload-left-out" : undefined}
            >
              {busy ? "Uploading…" : uploadLabel(pending, unsendable)}
            </button>
          ) : (
            <button type="button" className={linkClass} onClick={() => setItems([])}>
              Clear the list
            </button>
          )}
          {unsendable ? (
            <>
              <p id="upload-left-out" className="text-sm text-neutral-700">
                {unsendable === 1
                  ? "1 file cannot be sent and is left out (the reason is in its row)."
                  : `${unsendable} files cannot be sent and are left out (the reasons are in their rows).`}
              </p>
              {busy || waiting ? (
                <button
                  type="button"
                  className={`text-sm ${linkClass}`}
                  onClick={() => setItems((all) => all.filter((i) => i.phase !== "unsendable"))}
                >
                  Remove the files that cannot be sent
                </button>
              ) : null}
            </>
          ) : null}
        </div>
      ) : null}
    </div>
  );
}

/** "Upload 2 files", or "Upload 1 of 3 files" when some files in the list cannot be sent. */
function uploadLabel(pending: number, unsendable: number): string {
  if (unsendable === 0) return pending === 1 ? "Upload 1 file" : `Upload ${pending} files`;
  return `Upload ${pending} of ${pending + unsendable} files`;
}
