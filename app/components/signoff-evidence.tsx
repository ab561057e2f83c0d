import { Link } from "react-router";
import { conditionLabels } from "~/lib/domain/drive-log-terms";
import { gearText } from "~/lib/domain/target-text";
import { signoffStepLabels } from "~/lib/domain/signoff-text";
import type { SignoffView } from "~/lib/http/signoff-pages.server";
import { linkClass } from "./form-fields";
import { When } from "./page";

/** Known analysis settings in words with their units; any other key is shown as stored. */
const SETTING_TEXT: Record<string, (v: unknown) => string> = {
  cylinders: (v) => `${String(v)} cylinders`,
  stroke: (v) => (v === 2 ? "two-stroke" : v === 4 ? "four-stroke" : `stroke ${String(v)}`),
  firingOrder: (v) => `firing order ${String(v)}`,
  samplesPerRev: (v) => `${String(v)} samples per rev`,
  samplesPerRevMin: (v) => `at least ${String(v)} samples per rev`,
  samplesPerRevFixed: (v) => (v ? "fixed samples per rev" : "samples per rev by speed"),
  revsPerBlock: (v) => `${String(v)} revs per block`,
  orderResolution: (v) => `order resolution ${String(v)}`,
  overlap: (v) =>
    typeof v === "number" ? `block overlap ${Math.round(v * 100)} %` : `overlap ${String(v)}`,
  binRpm: (v) => `bins ${String(v)} rpm`,
  topOrder: (v) => `orders up to ${String(v)}`,
  lowPassHz: (v) => `low-pass ${String(v)} Hz`,
  minValidRpm: (v) => `lowest valid speed ${String(v)} rpm`,
  rattleLimitRadS2: (v) => `rattle limit ${String(v)} rad/s²`,
  window: (v) => `${String(v)} window`,
  detrend: (v) => `${String(v)} detrend`,
  strictIngest: (v) => (v ? "imperfect logs refused" : "imperfect logs repaired"),
  mappingSource: (v) => `channels from ${String(v)}`,
};

/** An analysis's settings in one line, each figure with its unit where it has one. */
export function settingsText(settings: Record<string, unknown>): string {
  const parts = Object.entries(settings)
    .filter(([, v]) => v !== null && v !== undefined && typeof v !== "object")
    .map(([k, v]) => (SETTING_TEXT[k] ? SETTING_TEXT[k](v) : `${k} ${String(v)}`));
  return parts.length ? parts.join(" · ") : "defaults";
}

function Fact({ term, children }: { term: string; children: React.ReactNode }) {
  return (
    <>
      <dt className="text-neutral-500">{term}</dt>
      <dd className="min-w-0">{children}</dd>
    </>
  );
}

const hashClass = "font-mono text-xs break-all";

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
    <div className="space-y-4">
      <ul className="space-y-4" data-testid="signoff-evidence">
        {signoff.logs.map((l) => (
          <li key={l.id} className="rounded-md border border-neutral-200 p-3">
            <p className="font-medium break-all">
              {logHref ? (
                <Link to={logHref(l.id)} className={linkClass}>
                  {l.fileName}
                </Link>
              ) : (
                l.fileName
              )}
            </p>
            <dl className="mt-2 grid grid-cols-1 gap-x-4 gap-y-1 text-sm sm:grid-cols-[10rem_1fr]">
              <Fact term="Test">
                {conditionLabels[l.condition]}
                {l.gear !== null ? `, ${gearText(l.gear)}` : ""};{" "}
                {l.testDate ? <When date={l.testDate} dateOnly /> : "no test date"}
              </Fact>
              <Fact term="Raw file">
                {(l.sizeBytes / 1024).toFixed(0)} KiB, uploaded <When date={l.uploadedAt} />
              </Fact>
              <Fact term="Raw file SHA-256">
                <span className={hashClass} data-sha256>
                  {l.sha256}
                </span>
              </Fact>
              <Fact term="Analysis">
                version {l.analysis.version}, made <When date={l.analysis.createdAt} />
              </Fact>
              <Fact term="Result SHA-256">
                <span className={hashClass}>{l.analysis.resultSha256}</span>
              </Fact>
              <Fact term="Settings">
                <span className="text-xs">{settingsText(l.analysis.settings)}</span>
              </Fact>
            </dl>
          </li>
        ))}
      </ul>
      <dl className="grid grid-cols-1 gap-x-4 gap-y-1 text-sm sm:grid-cols-[10rem_1fr]">
        <Fact term="Software">{signoff.softwareVersion}</Fact>
        <Fact term="Record digest">
          {signoff.digest ? (
            <span className={hashClass} data-digest>
              {signoff.digest}
            </span>
          ) : (
            <span className="text-neutral-600" data-digest="">
              recorded when the sign-off is approved
            </span>
          )}
        </Fact>
        {signoff.reportSha256 ? (
          <Fact term="Report PDF SHA-256">
            <span className={hashClass}>{signoff.reportSha256}</span>
          </Fact>
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
