import { getCollectionProps, type SubmissionResult } from "@conform-to/react";
import { useEffect, useRef, useState } from "react";
import { Form, Link } from "react-router";
import type { z } from "zod";
import { conditionLabels, LOG_CONDITIONS } from "~/lib/domain/drive-log-terms";
import type { Target, TargetInput, TargetVerdict } from "~/lib/domain/targets";
import { targetSchema } from "~/lib/domain/target-schema";
import { limitText, marginText, scopeText, TARGET_STATUS_LABELS } from "~/lib/domain/target-text";
import { countText } from "~/lib/base/plural";
import { CsrfInput } from "./csrf-input";
import { buttonClass, Field, FormError, IntentButton, SubmitButton, useSchemaForm } from "./form";
import { ChoiceField, fieldsetClass, InputField, legendClass } from "./form-fields";
import { Card, EmptyState } from "./page";

/** A target with how the vehicle's analysed drive logs fare against it. */
export interface TargetSummary extends Target {
  /** Over the analysed drive logs the target applies to. */
  counts: { passed: number; failed: number; notCovered: number; applicable: number };
  /** The verdict of the newest analysed drive log it applies to. */
  latest: { logId: number; fileName: string; verdict: TargetVerdict } | null;
}

/** What the vehicle page's action answers for a target form: which form, and conform's reply. */
export interface TargetFormReply {
  form: string;
  result: SubmissionResult<string[]>;
}

/** What the form posts; targetSchema accepts it (and JSON) and returns a TargetInput. */
type TargetFormFields = {
  kind: string;
  name: string;
  rpmFrom: string;
  rpmTo: string;
  minDb: string;
  maxRadS2: string;
  conditions: string[];
  gears: string;
};
const formSchema = targetSchema as unknown as z.ZodType<TargetInput, TargetFormFields>;

/** The form's starting values for a stored target, or a new one. */
function defaults(t?: Target): Record<string, string | string[]> {
  if (!t) return { kind: "isolation", conditions: [] };
  const s = (v: number | null) => (v === null ? "" : String(v));
  return {
    kind: t.kind,
    name: t.name,
    rpmFrom: s(t.rpmFrom),
    rpmTo: s(t.rpmTo),
    minDb: s(t.minDb),
    maxRadS2: s(t.maxRadS2),
    conditions: t.conditions,
    gears: t.gears.map((g) => (g === -1 ? "R" : g === 0 ? "N" : String(g))).join(" "),
  };
}

/** True after the first render in the browser: before it (and without JavaScript) both kinds' fields show. */
function useHydrated() {
  const [hydrated, setHydrated] = useState(false);
  useEffect(() => setHydrated(true), []);
  return hydrated;
}

/** The vehicle page's "Targets" card (docs/ui.md, vehicle page item 2). */
export function TargetsCard({
  vehicleId,
  targets,
  canEdit,
  reply,
  confirmDelete = null,
  analysedLogs,
  rattleLimitRadS2,
}: {
  vehicleId: number;
  targets: TargetSummary[];
  canEdit: boolean;
  reply: TargetFormReply | null;
  /** The target whose delete button was pressed without JavaScript: the page asks first. */
  confirmDelete?: number | null;
  /** Drive logs of the vehicle with a finished analysis. */
  analysedLogs: number;
  rattleLimitRadS2: number;
}) {
  return (
    <Card title="Targets" id="targets">
      <div className="space-y-4">
        {targets.length === 0 ? (
          <EmptyState>
            No targets yet.{" "}
            {canEdit
              ? "Add one below: a minimum isolation over an engine-speed range, or a maximum angular acceleration at idle."
              : "An engineer sets the programme's targets for this vehicle."}
          </EmptyState>
        ) : (
          <ul className="divide-y divide-neutral-100 rounded-md border border-neutral-200">
            {targets.map((t) => (
              <li key={t.id} className="px-4 py-3" data-target-id={t.id}>
                <div className="flex flex-wrap items-baseline justify-between gap-x-6 gap-y-1">
                  <div>
                    <p className="font-medium text-neutral-900">{t.name}</p>
                    <p className="text-sm text-neutral-700">
                      {t.kind === "isolation" ? "Isolation " : "Rattle: "}
                      {limitText(t)}
                    </p>
                    <p className="text-xs text-neutral-500">{scopeText(t)}</p>
                  </div>
                  <Counts counts={t.counts} analysedLogs={analysedLogs} />
                </div>
                {t.latest ? <Latest vehicleId={vehicleId} latest={t.latest} /> : null}
                {canEdit ? (
                  <Disclosure
                    className="mt-2"
                    reply={reply?.form === `target-${t.id}` ? reply.result : null}
                    forceOpen={confirmDelete === t.id}
                    summary={
                      <span className="text-sm text-indigo-700 hover:text-indigo-900">
                        Edit or delete <span className="sr-only">{t.name}</span>
                      </span>
                    }
                  >
                    <div className="mt-3 space-y-3">
                      <TargetForm
                        id={`target-${t.id}`}
                        target={t}
                        reply={reply?.form === `target-${t.id}` ? reply.result : null}
                        rattleLimitRadS2={rattleLimitRadS2}
                      />
                      <DeleteTarget
                        vehicleId={vehicleId}
                        target={t}
                        asked={confirmDelete === t.id}
                      />
                    </div>
                  </Disclosure>
                ) : null}
              </li>
            ))}
          </ul>
        )}
        {canEdit ? (
          <Disclosure
            reply={reply?.form === "target-new" ? reply.result : null}
            summary={
              <span className="text-sm font-medium text-indigo-700 hover:text-indigo-900">
                Add a target
              </span>
            }
          >
            <div className="mt-3">
              <TargetForm
                id="target-new"
                reply={reply?.form === "target-new" ? reply.result : null}
                rattleLimitRadS2={rattleLimitRadS2}
              />
            </div>
          </Disclosure>
        ) : null}
      </div>
    </Card>
  );
}

/**
 * A <details> around a form: open after a refused submission (also without JavaScript), closed
 * after a saved one, and otherwise as the user leaves it.
 */
function Disclosure({
  reply,
  forceOpen = false,
  summary,
  className,
  children,
}: {
  reply: SubmissionResult<string[]> | null;
  /** Open regardless of the reply (a delete waiting for its confirmation). */
  forceOpen?: boolean;
  summary: React.ReactNode;
  className?: string;
  children: React.ReactNode;
}) {
  const refused = reply?.status === "error";
  const [open, setOpen] = useState(refused || forceOpen);
  useEffect(() => {
    if (reply) setOpen(reply.status === "error");
  }, [reply]);
  return (
    <details className={className} open={open} onToggle={(e) => setOpen(e.currentTarget.open)}>
      <summary className="cursor-pointer">{summary}</summary>
      {children}
    </details>
  );
}

/**
 * "Delete target" asks first (issue 11): with JavaScript the question opens in place and takes
 * the focus (Escape or "Keep the target" closes it and gives the focus back to the button);
 * without, the button posts and the page comes back with the same question. Only the second
 * button, which posts confirm=yes, deletes.
 */
function DeleteTarget({
  vehicleId,
  target,
  asked,
}: {
  vehicleId: number;
  target: Target;
  asked: boolean;
}) {
  const hydrated = useHydrated();
  const [asking, setAsking] = useState(asked);
  const askButton = useRef<HTMLButtonElement>(null);
  const question = useRef<HTMLDivElement>(null);
  const opened = useRef(false);
  useEffect(() => {
    if (asking && opened.current) question.current?.focus();
  }, [asking]);
  const panelId = `delete-target-${target.id}`;
  const keep = () => {
    setAsking(false);
    askButton.current?.focus();
  };
  return (
    <div className="space-y-3 border-t border-neutral-100 pt-3">
      {hydrated ? (
        <button
          ref={askButton}
          type="button"
          aria-expanded={asking}
          aria-controls={panelId}
          onClick={() => {
            opened.current = true;
            setAsking(true);
          }}
          className={buttonClass("danger")}
        >
          Delete target <span className="sr-only">{target.name}</span>
        </button>
      ) : (
        <IntentButton intent="delete-target" fields={{ targetId: target.id }} tone="danger">
          Delete target <span className="sr-only">{target.name}</span>
        </IntentButton>
      )}
      {asking ? (
        <div
          id={panelId}
          ref={question}
          role="group"
          tabIndex={-1}
          autoFocus={asked}
          aria-labelledby={`${panelId}-question`}
          aria-describedby={`${panelId}-effect`}
          onKeyDown={(e) => {
            if (e.key === "Escape" && hydrated) {
              e.preventDefault();
              keep();
            }
          }}
          className="rounded-md border border-red-200 bg-red-50 p-3 focus:outline-2 focus:outline-red-600"
          data-delete-confirm={target.id}
        >
          <p id={`${panelId}-question`} className="text-sm font-semibold text-red-900">
            Delete the target “{target.name}”?
          </p>
          <p id={`${panelId}-effect`} className="mt-1 text-sm text-red-900">
            Its pass and fail verdicts disappear from every drive log of this vehicle. This cannot
            be undone.
          </p>
          <Form method="post" className="mt-3 flex flex-wrap items-center gap-3">
            <CsrfInput />
            <input type="hidden" name="targetId" value={target.id} />
            <input type="hidden" name="confirm" value="yes" />
            <SubmitButton name="intent" value="delete-target" tone="danger">
              Yes, delete <span className="sr-only">{target.name}</span>
            </SubmitButton>
            {hydrated ? (
              <button type="button" onClick={keep} className={buttonClass("secondary")}>
                Keep the target
              </button>
            ) : (
              <a href={`/vehicles/${vehicleId}#targets`} className={buttonClass("secondary")}>
                Keep the target
              </a>
            )}
          </Form>
        </div>
      ) : null}
    </div>
  );
}

/** The newest applicable drive log's verdict, with its margin and the reason in words. */
function Latest({
  vehicleId,
  latest: { logId, fileName, verdict: v },
}: {
  vehicleId: number;
  latest: NonNullable<TargetSummary["latest"]>;
}) {
  const tone =
    v.status === "pass"
      ? "text-green-700"
      : v.status === "fail"
        ? "text-red-700"
        : "text-neutral-700";
  return (
    <p className="mt-1 text-sm text-neutral-700" data-latest-verdict={v.status}>
      Latest:{" "}
      <Link
        to={`/vehicles/${vehicleId}/logs/${logId}`}
        className="text-indigo-700 underline underline-offset-2 hover:text-indigo-900"
      >
        {fileName}
      </Link>{" "}
      <span className={`font-medium ${tone}`}>{TARGET_STATUS_LABELS[v.status]}</span>
      {v.margin !== null ? <span className="tabular-nums"> (margin {marginText(v)})</span> : null}
      <span className="block text-xs text-neutral-500">{v.detail}</span>
    </p>
  );
}

function Counts({
  counts: c,
  analysedLogs,
}: {
  counts: TargetSummary["counts"];
  analysedLogs: number;
}) {
  if (c.applicable === 0)
    return (
      <p className="text-sm text-neutral-500">
        {analysedLogs === 0
          ? "No analysed drive logs yet"
          : "Applies to none of the analysed drive logs"}
      </p>
    );
  const pill = "inline-flex items-center rounded px-1.5 py-0.5 text-xs font-medium";
  return (
    <p className="flex flex-wrap items-center gap-1.5 text-sm text-neutral-600">
      <span className={`${pill} bg-green-50 text-green-800`}>{c.passed} passing</span>
      <span
        className={`${pill} ${c.failed ? "bg-red-50 text-red-800" : "bg-neutral-100 text-neutral-600"}`}
      >
        {c.failed} failing
      </span>
      {c.notCovered ? (
        <span className={`${pill} bg-neutral-100 text-neutral-700`}>
          {c.notCovered} not covered
        </span>
      ) : null}
      <span>of {countText(c.applicable, "analysed drive log")} it applies to</span>
    </p>
  );
}

/** Add or edit one target; targetSchema checks it here and in the page's action. */
function TargetForm({
  id,
  target,
  reply,
  rattleLimitRadS2,
}: {
  id: string;
  target?: Target;
  reply: SubmissionResult<string[]> | null;
  rattleLimitRadS2: number;
}) {
  const [form, fields] = useSchemaForm(
    id,
    formSchema,
    reply,
    defaults(target) as unknown as Record<string, string>,
  );
  const hydrated = useHydrated();
  const kind = (fields.kind.value as string | undefined) ?? target?.kind ?? "isolation";
  const showIsolation = !hydrated || kind === "isolation";
  const showRattle = !hydrated || kind === "rattle";
  const conditionErrors = Object.values(fields.conditions.allErrors ?? {}).flat();
  return (
    <Form method="post" id={form.id} onSubmit={form.onSubmit} noValidate className="space-y-4">
      <CsrfInput />
      <input type="hidden" name="intent" value={target ? "update-target" : "create-target"} />
      {target ? <input type="hidden" name="targetId" value={target.id} /> : null}
      <FormError id={form.errorId} errors={form.errors} />
      <div className="grid gap-4 sm:grid-cols-2">
        <Field
          label="Name"
          meta={fields.name}
          hint="What the programme calls it, e.g. “Run-up isolation, 2nd–4th gear”."
        />
        <ChoiceField
          label="What it limits"
          meta={fields.kind}
          options={[
            { value: "isolation", label: "Isolation (minimum, dB)" },
            { value: "rattle", label: "Gear rattle at idle (maximum, rad/s²)" },
          ]}
        />
      </div>
      {showIsolation ? (
        <fieldset className={fieldsetClass}>
          <legend className={legendClass}>
            Isolation target{hydrated ? "" : " (fill in when it limits isolation)"}
          </legend>
          <div className="grid gap-4 sm:grid-cols-3">
            <InputField label="From engine speed" unit="rpm" meta={fields.rpmFrom} numeric />
            <InputField label="To engine speed" unit="rpm" meta={fields.rpmTo} numeric />
            <InputField
              label="Minimum isolation"
              unit="dB"
              meta={fields.minDb}
              numeric
              hint="20·log10 of crank over gearbox-input amplitude; negative allows amplification."
            />
          </div>
        </fieldset>
      ) : null}
      {showRattle ? (
        <fieldset className={fieldsetClass}>
          <legend className={legendClass}>
            Rattle target{hydrated ? "" : " (fill in when it limits gear rattle)"}
          </legend>
          <div className="max-w-md">
            <InputField
              label="Maximum angular acceleration"
              unit="rad/s²"
              meta={fields.maxRadS2}
              numeric
              hint={`Gearbox input at idle: the larger of the firing-order amplitude and the time-domain peak. The vehicle's rattle limit is ${rattleLimitRadS2} rad/s².`}
            />
          </div>
        </fieldset>
      ) : null}
      <fieldset className={fieldsetClass}>
        <legend className={legendClass}>Applies to</legend>
        <div
          role="group"
          aria-labelledby={`${id}-conditions-label`}
          aria-describedby={
            conditionErrors.length ? fields.conditions.errorId : `${id}-conditions-hint`
          }
        >
          <p id={`${id}-conditions-label`} className="text-sm font-medium text-neutral-800">
            Test conditions
          </p>
          <p id={`${id}-conditions-hint`} className="text-xs text-neutral-500">
            None ticked: drive logs of every condition.
          </p>
          <div className="mt-2 grid gap-x-4 gap-y-1 sm:grid-cols-3">
            {getCollectionProps(fields.conditions, {
              type: "checkbox",
              options: [...LOG_CONDITIONS],
            }).map((props) => (
              <label key={props.key} className="flex items-center gap-2 text-sm">
                <input {...props} key={props.key} className="size-4 accent-indigo-600" />
                {conditionLabels[props.value as (typeof LOG_CONDITIONS)[number]]}
              </label>
            ))}
          </div>
          {conditionErrors.length ? (
            <p id={fields.conditions.errorId} className="mt-1 text-sm text-red-700">
              {conditionErrors.join(" ")}
            </p>
          ) : null}
        </div>
        <div className="mt-4 max-w-md">
          <InputField
            label="Gears"
            meta={fields.gears}
            hint="Separated by spaces or commas, e.g. 2 3 4; R for reverse, N for neutral. Empty: every gear, and logs without a gear."
          />
        </div>
      </fieldset>
      <SubmitButton>{target ? "Save target" : "Add target"}</SubmitButton>
    </Form>
  );
}
