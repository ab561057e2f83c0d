import { useMemo, useState } from "react";
import { Form, Link, useNavigation } from "react-router";
import { checkClaims, type ClaimCheck, type ClaimLog } from "~/lib/domain/signoff";
import { conditionLabels, type LogCondition } from "~/lib/domain/drive-log-terms";
import type { Target } from "~/lib/domain/targets";
import { gearText, marginText, TARGET_STATUS_LABELS } from "~/lib/domain/target-text";
import type { ClaimValues, ProposalLog, ProposalValues } from "~/lib/http/signoff-pages.server";
import { CsrfInput } from "./csrf-input";
import { FormError, SubmitButton, buttonClass } from "./form";
import { inputClass, linkClass } from "./form-fields";
import { ClaimVerdict } from "./signoff-claims";

type ProposalTarget = Target & { limit: string; scope: string };

/**
 * The proposal form (issue 16): per target a checkbox to claim it and the finished drive logs
 * of the variant that prove it (those that pass are ticked first). The claim check runs in the
 * browser as the form changes (domain/signoff.ts checkClaims on the loader's verdicts) and again
 * on the server when it is sent; a claim that fails or is not covered asks for a deviation with a
 * reason. Without JavaScript, "Check claims" asks the server for the same check.
 */
export function ProposalForm({
  vehicleId,
  damperVariant,
  targets,
  logs,
  initial,
  errors,
  serverChecks,
}: {
  vehicleId: number;
  damperVariant: string;
  targets: ProposalTarget[];
  logs: ProposalLog[];
  initial: ProposalValues;
  errors: Record<string, string>;
  serverChecks: ClaimCheck[] | null;
}) {
  const [values, setValues] = useState(initial);
  const busy = useNavigation().state === "submitting";
  const claimOf = (id: number): ClaimValues =>
    values.claims.find((c) => c.targetId === id) ?? {
      targetId: id,
      on: false,
      logIds: [],
      deviation: "",
    };
  const update = (id: number, change: Partial<ClaimValues>) =>
    setValues((v) => ({
      ...v,
      claims: [...v.claims.filter((c) => c.targetId !== id), { ...claimOf(id), ...change }],
    }));
  const live = useMemo(() => {
    const map = new Map<number, ClaimLog>(
      logs.map((l) => [
        l.id,
        { id: l.id, fileName: l.fileName, damperVariant: l.damperVariant, verdicts: l.verdicts },
      ]),
    );
    const on = targets.map((t) => claimOf(t.id)).filter((c) => c.on && c.logIds.length > 0);
    return checkClaims({
      targets,
      claims: on.map((c) => ({ targetId: c.targetId, logIds: c.logIds })),
      deviations: on
        .filter((c) => c.deviation.trim() !== "")
        .map((c) => ({ targetId: c.targetId, reason: c.deviation.trim() })),
      logs: map,
      damperVariant,
    });
  }, [values, logs, targets, damperVariant]);
  const checkOf = (id: number) =>
    live.checks.find((c) => c.targetId === id) ??
    serverChecks?.find((c) => c.targetId === id) ??
    null;
  const claimed = targets.filter((t) => claimOf(t.id).on).length;
  const blocking = live.checks.filter((c) => c.blocking).length;

  return (
    <Form method="post" id="signoff-proposal" noValidate className="space-y-6">
      <CsrfInput />
      <input type="hidden" name="damperVariant" value={damperVariant} />
      <FormError id="signoff-proposal-error" errors={errors.form ? [errors.form] : undefined} />
      {targets.map((t) => {
        const claim = claimOf(t.id);
        const check = claim.on ? checkOf(t.id) : null;
        const needsDeviation = claim.on && (check ? check.status !== "pass" : false);
        const logsError = errors[`logs-${t.id}`];
        const deviationError = errors[`deviation-${t.id}`];
        return (
          <fieldset
            key={t.id}
            className="rounded-lg border border-neutral-200 bg-white p-4 shadow-xs sm:p-5"
            data-claim={t.id}
          >
            <legend className="sr-only">Target {t.name}</legend>
            <div className="flex items-start gap-3">
              <input
                id={`claim-${t.id}`}
                type="checkbox"
                name="claim"
                value={t.id}
                checked={claim.on}
                onChange={(e) => update(t.id, { on: e.target.checked })}
                className="mt-1 size-4 accent-indigo-600"
              />
              <label htmlFor={`claim-${t.id}`} className="min-w-0 flex-1">
                <span className="font-medium">Claim “{t.name}”</span>
                <span className="block text-sm text-neutral-600">
                  {t.limit}; {t.scope.toLowerCase()}
                </span>
              </label>
            </div>
            {claim.on ? (
              <div className="mt-3 pl-7" aria-live="polite">
                {check ? (
                  <ClaimVerdict check={check} />
                ) : (
                  <p className="text-sm text-neutral-600">
                    Name at least one drive log that proves it.
                  </p>
                )}
              </div>
            ) : null}
            <div className={`mt-3 pl-7 ${claim.on ? "" : "opacity-60"}`}>
              <p id={`logs-${t.id}-label`} className="text-sm font-medium text-neutral-800">
                Drive logs that prove it
              </p>
              {logs.length === 0 ? (
                <p className="text-sm text-neutral-600">No finished drive log of this variant.</p>
              ) : (
                <ul
                  aria-labelledby={`logs-${t.id}-label`}
                  aria-describedby={logsError ? `logs-${t.id}-error` : undefined}
                  className="mt-1 space-y-1"
                >
                  {logs.map((l) => (
                    <LogChoice
                      key={l.id}
                      targetId={t.id}
                      log={l}
                      checked={claim.logIds.includes(l.id)}
                      disabled={!claim.on}
                      onChange={(on) =>
                        update(t.id, {
                          logIds: on
                            ? [...claim.logIds, l.id]
                            : claim.logIds.filter((x) => x !== l.id),
                        })
                      }
                    />
                  ))}
                </ul>
              )}
              {logsError ? (
                <p id={`logs-${t.id}-error`} className="mt-1 text-sm text-red-700">
                  {logsError}
                </p>
              ) : null}
            </div>
            {needsDeviation || deviationError ? (
              <div className="mt-3 pl-7">
                <label
                  htmlFor={`deviation-${t.id}`}
                  className="block text-sm font-medium text-neutral-800"
                >
                  Deviation: why the claim is accepted anyway
                </label>
                <textarea
                  id={`deviation-${t.id}`}
                  name={`deviation-${t.id}`}
                  rows={2}
                  value={claim.deviation}
                  onChange={(e) => update(t.id, { deviation: e.target.value })}
                  aria-invalid={deviationError ? true : undefined}
                  aria-describedby={`deviation-${t.id}-hint${deviationError ? ` deviation-${t.id}-error` : ""}`}
                  className={`mt-1 ${inputClass}`}
                />
                <p id={`deviation-${t.id}-hint`} className="mt-1 text-xs text-neutral-500">
                  At least 10 characters; it is frozen with the sign-off and printed in the report.
                </p>
                {deviationError ? (
                  <p id={`deviation-${t.id}-error`} className="mt-1 text-sm text-red-700">
                    {deviationError}
                  </p>
                ) : null}
              </div>
            ) : null}
          </fieldset>
        );
      })}
      <div>
        <label htmlFor="note" className="block text-sm font-medium text-neutral-800">
          Note
        </label>
        <textarea
          id="note"
          name="note"
          rows={3}
          value={values.note}
          onChange={(e) => setValues((v) => ({ ...v, note: e.target.value }))}
          aria-invalid={errors.note ? true : undefined}
          aria-describedby={errors.note ? "note-hint note-error" : "note-hint"}
          className={`mt-1 ${inputClass}`}
        />
        <p id="note-hint" className="mt-1 text-xs text-neutral-500">
          Optional: what the approver should know (test programme, open points).
        </p>
        {errors.note ? (
          <p id="note-error" className="mt-1 text-sm text-red-700">
            {errors.note}
          </p>
        ) : null}
      </div>
      <p className="text-sm text-neutral-700" aria-live="polite" data-claim-summary>
        {claimed === 0
          ? "No target claimed yet."
          : blocking > 0
            ? `${claimed} ${claimed === 1 ? "target" : "targets"} claimed; ${blocking} still ${blocking === 1 ? "needs" : "need"} a deviation or other drive logs.`
            : `${claimed} ${claimed === 1 ? "target" : "targets"} claimed; nothing blocks the proposal.`}
      </p>
      <div className="flex flex-wrap items-center gap-3">
        <SubmitButton name="intent" value="propose">
          {busy ? "Proposing…" : "Propose sign-off"}
        </SubmitButton>
        <button type="submit" name="intent" value="check" className={buttonClass("secondary")}>
          Check claims
        </button>
        <Link to={`/vehicles/${vehicleId}`} className={linkClass}>
          Cancel
        </Link>
      </div>
    </Form>
  );
}

function LogChoice({
  targetId,
  log,
  checked,
  disabled,
  onChange,
}: {
  targetId: number;
  log: ProposalLog;
  checked: boolean;
  disabled: boolean;
  onChange: (on: boolean) => void;
}) {
  const v = log.verdicts.find((x) => x.targetId === targetId);
  const id = `log-${targetId}-${log.id}`;
  const tone =
    v?.status === "pass"
      ? "text-green-700"
      : v?.status === "fail"
        ? "text-red-700"
        : "text-neutral-500";
  return (
    <li className="flex items-start gap-2 text-sm">
      <input
        id={id}
        type="checkbox"
        name={`logs-${targetId}`}
        value={log.id}
        checked={checked}
        disabled={disabled}
        onChange={(e) => onChange(e.target.checked)}
        className="mt-0.5 size-4 accent-indigo-600"
      />
      <label htmlFor={id} className="min-w-0">
        <span className="break-all">{log.fileName}</span>{" "}
        <span className="text-neutral-500">
          ({conditionLabels[log.condition as LogCondition]}
          {log.gear !== null ? `, ${gearText(log.gear)}` : ""}, {log.date})
        </span>{" "}
        <span className={`font-semibold ${tone}`}>
          {v ? TARGET_STATUS_LABELS[v.status] : "not analysed"}
        </span>
        {v && v.margin !== null ? (
          <span className="text-neutral-600"> — margin {marginText(v)}</span>
        ) : null}
      </label>
    </li>
  );
}
