import type { TargetVerdict } from "~/lib/domain/targets";
import { marginText, TARGET_STATUS_LABELS } from "~/lib/domain/target-text";

const statusClass: Record<TargetVerdict["status"], string> = {
  pass: "text-green-700",
  fail: "text-red-700",
  "not-covered": "text-neutral-500",
  "not-applicable": "text-neutral-500",
};

/** Each target's verdict with its margin and the reason in one line (drive-log and rattle pages). */
export function TargetVerdictList({
  verdicts,
  className = "",
}: {
  verdicts: TargetVerdict[];
  className?: string;
}) {
  return (
    <ul className={`space-y-1.5 text-sm ${className}`} data-testid="target-verdicts">
      {verdicts.map((t) => (
        <li key={t.targetId} data-status={t.status}>
          <span className={`font-semibold ${statusClass[t.status]}`}>
            {TARGET_STATUS_LABELS[t.status]}
          </span>{" "}
          {t.name}
          {t.margin !== null ? (
            <span className="text-neutral-600"> — margin {marginText(t)}</span>
          ) : null}
          <span className="block text-xs text-neutral-500">{t.detail}</span>
        </li>
      ))}
    </ul>
  );
}
