import { getCollectionProps, type SubmissionResult } from "@conform-to/react";
import type { z } from "zod";
import { conditionLabels, LOG_CONDITIONS } from "~/lib/domain/drive-log-terms";
import type { Target, TargetInput } from "~/lib/domain/targets";
import { targetSchema } from "~/lib/domain/target-schema";
import { gearCode } from "~/lib/domain/target-text";
import { Field, SubmitButton, SchemaForm, useSchemaForm } from "./form";
import { ChoiceField, fieldsetClass, InputField, legendClass } from "./form-fields";
import { useHydrated } from "./use-hydrated";

/** What the form posts; targetSchema accepts it (and JSON) and returns a TargetInput. */
type TargetFormFields = {
  kind: string;
  name: string;
  rpmFrom: string;
  rpmTo: string;
  minDb: string;
  maxRadS2: string;
  maxDb: string;
  minMarginDeg: string;
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
    maxDb: s(t.maxDb),
    minMarginDeg: s(t.minMarginDeg),
    conditions: t.conditions,
    gears: t.gears.map(gearCode).join(" "),
  };
}

/** Add or edit one target; targetSchema checks it here and in the page's action. */
export function TargetForm({
  id,
  target,
  reply,
  rattleLimitRadS2,
  damperTravelLimitDeg,
}: {
  id: string;
  target?: Target;
  reply: SubmissionResult<string[]> | null;
  rattleLimitRadS2: number;
  /** The vehicle's travel limit, for the twist-margin hint; undefined: not known to the page. */
  damperTravelLimitDeg?: number | null;
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
  const showStartStop = !hydrated || kind === "start-stop";
  const showTwist = !hydrated || kind === "twist-margin";
  const travel =
    damperTravelLimitDeg === undefined
      ? "the vehicle's damper travel limit (set on its edit page)"
      : damperTravelLimitDeg === null
        ? "the vehicle's damper travel limit, which is not set yet (its edit page): until it is, this target does not apply"
        : `the vehicle's damper travel limit, ${damperTravelLimitDeg}° stop to stop`;
  const conditionErrors = Object.values(fields.conditions.allErrors ?? {}).flat();
  return (
    <SchemaForm
      form={form}
      intent={target ? "update-target" : "create-target"}
      hidden={target ? <input type="hidden" name="targetId" value={target.id} /> : null}
      className="space-y-4"
    >
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
            { value: "start-stop", label: "Amplification at engine start and stop (maximum, dB)" },
            { value: "twist-margin", label: "Twist margin to the end stops (minimum, °)" },
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
      {showStartStop ? (
        <fieldset className={fieldsetClass}>
          <legend className={legendClass}>
            Start/stop target{hydrated ? "" : " (fill in when it limits start/stop amplification)"}
          </legend>
          <div className="max-w-md">
            <InputField
              label="Maximum peak amplification"
              unit="dB"
              meta={fields.maxDb}
              numeric
              hint="The largest amplification through the damper's resonance over the drive log's engine starts and stops (positive = the gearbox input moves more than the crank)."
            />
          </div>
        </fieldset>
      ) : null}
      {showTwist ? (
        <fieldset className={fieldsetClass}>
          <legend className={legendClass}>
            Twist-margin target{hydrated ? "" : " (fill in when it limits the twist margin)"}
          </legend>
          <div className="max-w-md">
            <InputField
              label="Minimum twist margin"
              unit="°"
              meta={fields.minMarginDeg}
              numeric
              hint={`How far the largest start/stop twist (peak to peak) must stay below ${travel}.`}
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
    </SchemaForm>
  );
}
