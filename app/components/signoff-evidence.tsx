import { Link } from "react-router";
import { conditionLabels, gearLabel } from "~/lib/domain/drive-log-terms";
import { signoffStepLabels } from "~/lib/domain/signoff-text";
import type { SignoffView } from "~/lib/http/signoff-pages.server";
import { linkClass } from "./form-fields";
import { TableHead, tableClass, tdClass, When } from "./page";
import { ScrollArea } from "./scroll-area";

/** Known analysis settings with their units; any other key is shown as stored. */
const SETTING_TEXT: Record<string, (v: unknown) => string> = {
  firingOrder: (v) => `firing order ${String(v)}`,
  revsPerBlock: (v) => `${String(v)} revs per block`,
  binRpm: (v) => `bins ${String(v)} rpm`,
  overlap: (v) =>
    typeof v === "number" ? `overlap ${Math.round(v * 100)} %` : `overlap ${String(v)}`,
  samplesPerRev: (v) => `${String(v)} samples per rev`,
};

/** An analysis's settings in one line, each figure with its unit where it has one. */
export function settingsText(settings: Record<string, unknown>): string {
  const parts = Object.entries(settings)
    .filter(([, v]) => v !== null && v !== undefined && typeof v !== "object")
    .map(([k, v]) => (SETTING_TEXT[k] ? SETTING_TEXT[k](v) : `${k} ${String(v)}`));
  return parts.length ? parts.join(" · ") : "defaults";
}

/**
 * The frozen evidence of a sign-off (traceability): per drive log the file name, its SHA-256 as
 * uploaded, the upload and test dates, the analysis version and its settings, the SHA-256 of the
 * stored result; and the software version that froze it.
 */
export function EvidenceTable({
  signoff,
  logHref,
}: {
  signoff: SignoffView;
  logHref?: (logId: number) => string;
}) {
  return (
    <div className="space-y-3">
      <ScrollArea label="Frozen evidence">
        <table className={tableClass} data-testid="signoff-evidence">
          <TableHead
            columns={["Drive log", "Test", "Raw file SHA-256", "Uploaded", "Analysis", "Settings"]}
          />
          <tbody>
            {signoff.logs.map((l) => (
              <tr key={l.id} className="align-top">
                <td className={`${tdClass} break-all`}>
                  {logHref ? (
                    <Link to={logHref(l.id)} className={linkClass}>
                      {l.fileName}
                    </Link>
                  ) : (
                    l.fileName
                  )}
                  <span className="block text-xs text-neutral-500">
                    {(l.sizeBytes / 1024).toFixed(0)} KiB
                  </span>
                </td>
                <td className={tdClass}>
                  {conditionLabels[l.condition]}
                  {l.gear !== null ? `, ${gearLabel(l.gear)}` : ""}
                  <span className="block text-xs text-neutral-500">
                    {l.testDate ? <When date={l.testDate} dateOnly /> : "no test date"}
                  </span>
                </td>
                <td className={`${tdClass} font-mono text-xs break-all`} data-sha256>
                  {l.sha256}
                </td>
                <td className={`${tdClass} whitespace-nowrap`}>
                  <When date={l.uploadedAt} />
                </td>
                <td className={tdClass}>
                  version {l.analysis.version}
                  <span className="block text-xs text-neutral-500">
                    <When date={l.analysis.createdAt} />
                  </span>
                  <span className="block font-mono text-[11px] break-all text-neutral-500">
                    result SHA-256 {l.analysis.resultSha256}
                  </span>
                </td>
                <td className={`${tdClass} text-xs`}>{settingsText(l.analysis.settings)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </ScrollArea>
      <dl className="grid gap-x-6 gap-y-1 text-sm sm:grid-cols-[auto_1fr]">
        <dt className="text-neutral-500">Software</dt>
        <dd>Twistlog {signoff.softwareVersion}</dd>
        <dt className="text-neutral-500">Record digest (SHA-256)</dt>
        <dd className="font-mono text-xs break-all" data-digest>
          {signoff.digest ?? "recorded when the sign-off is approved"}
        </dd>
        {signoff.reportSha256 ? (
          <>
            <dt className="text-neutral-500">Report PDF (SHA-256)</dt>
            <dd className="font-mono text-xs break-all">{signoff.reportSha256}</dd>
          </>
        ) : null}
      </dl>
    </div>
  );
}

/** The sign-off's steps, oldest first: who, when, and what they wrote. */
export function SignoffHistory({ history }: { history: SignoffView["history"] }) {
  return (
    <ol className="space-y-3 border-l-2 border-neutral-200 pl-4" data-testid="signoff-history">
      {history.map((h, i) => (
        <li key={i} data-step={h.step}>
          <p className="text-sm">
            <span className="font-semibold">{signoffStepLabels[h.step]}</span>
            {h.by ? <> by {h.by}</> : null} · <When date={h.at} />
          </p>
          {h.text ? (
            <p className="mt-0.5 text-sm whitespace-pre-line text-neutral-700">{h.text}</p>
          ) : null}
        </li>
      ))}
    </ol>
  );
}
