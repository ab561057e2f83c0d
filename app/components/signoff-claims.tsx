import { Link } from "react-router";
import type { ClaimCheck } from "~/lib/domain/signoff";
import { claimStatusLabels } from "~/lib/domain/signoff-text";
import { marginText, TARGET_STATUS_LABELS } from "~/lib/domain/target-text";
import { linkClass } from "./form-fields";

const statusTone: Record<string, string> = {
  pass: "text-green-700",
  fail: "text-red-700",
  "not-covered": "text-neutral-600",
  "not-applicable": "text-neutral-500",
};

/** The least margin of a claim with its unit, or a dash. */
export function claimMarginText(c: Pick<ClaimCheck, "margin" | "unit">): string {
  return c.margin === null ? "—" : marginText(c);
}

/** One claim's verdict as the proposal form shows it while the engineer chooses. */
export function ClaimVerdict({ check }: { check: ClaimCheck }) {
  return (
    <div className="text-sm" data-claim-status={check.status}>
      <p>
        <span className={`font-semibold ${statusTone[check.status]}`}>
          {claimStatusLabels[check.status]}
        </span>
        {check.margin !== null ? (
          <span className="text-neutral-700"> — least margin {claimMarginText(check)}</span>
        ) : null}
        {check.deviation !== null && check.status !== "pass" ? (
          <span className="text-amber-800"> — deviation recorded</span>
        ) : null}
      </p>
      <p className="text-xs text-neutral-600">{check.detail}</p>
    </div>
  );
}

/**
 * The claims of a sign-off as frozen: each target's verdict, least margin and deviation, and
 * every drive log behind it with its own verdict. `logHref` links a drive log's page (signed-in
 * pages only; a share link shows no drive-log pages).
 */
export function ClaimsSummary({
  claims,
  logHref,
}: {
  claims: ClaimCheck[];
  logHref?: (logId: number) => string;
}) {
  return (
    <ul className="divide-y divide-neutral-100" data-testid="signoff-claims">
      {claims.map((c) => (
        <li key={c.targetId} className="py-3" data-claim={c.targetId} data-status={c.status}>
          <div className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
            <span className={`font-semibold ${statusTone[c.status]}`}>
              {claimStatusLabels[c.status]}
            </span>
            <span className="font-medium">{c.targetName}</span>
            <span className="text-sm text-neutral-600">
              limit {formatLimit(c)}; least margin <span data-margin>{claimMarginText(c)}</span>
            </span>
          </div>
          <p className="mt-1 text-xs text-neutral-600">{c.detail}</p>
          {c.deviation !== null && c.status !== "pass" ? (
            <p className="mt-2 rounded-md border border-amber-300 bg-amber-50 px-3 py-2 text-sm text-amber-950">
              <span className="font-semibold">Deviation:</span> {c.deviation}
            </p>
          ) : null}
          <ul className="mt-2 space-y-0.5 text-sm">
            {c.logs.map((l) => (
              <li key={l.logId} className="flex flex-wrap gap-x-2">
                {logHref ? (
                  <Link to={logHref(l.logId)} className={`${linkClass} break-all`}>
                    {l.fileName}
                  </Link>
                ) : (
                  <span className="break-all">{l.fileName}</span>
                )}
                <span className={`font-semibold ${statusTone[l.status]}`}>
                  {TARGET_STATUS_LABELS[l.status]}
                </span>
                {l.margin !== null ? (
                  <span className="text-neutral-600">
                    margin {marginText({ margin: l.margin, unit: c.unit })}
                  </span>
                ) : null}
                {l.atRpm !== null ? (
                  <span className="text-neutral-500">at {Math.round(l.atRpm)} rpm</span>
                ) : null}
              </li>
            ))}
          </ul>
        </li>
      ))}
    </ul>
  );
}

function formatLimit(c: Pick<ClaimCheck, "kind" | "limit" | "unit">): string {
  const n = c.unit === "rad/s²" ? c.limit.toFixed(0) : c.limit.toFixed(1);
  const bound = c.kind === "isolation" || c.kind === "twist-margin" ? "at least" : "at most";
  return `${bound} ${n}${c.unit === "°" ? "°" : ` ${c.unit}`}`;
}
