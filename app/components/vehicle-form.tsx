import type { SubmissionResult } from "@conform-to/react";
import { Link } from "react-router";
import {
  DAMPER_TYPES,
  damperLabels,
  DEFAULT_RATTLE_LIMIT_RAD_S2,
  FUELS,
  RATTLE_LIMIT_SOURCE,
  TRANSMISSION_TYPES,
  transmissionLabels,
} from "~/lib/domain/drive-log-terms";
import { z } from "zod";
import { DAMPER_TRAVEL_HINT, vehicleSchema } from "~/lib/domain/vehicle-schema";
import { SubmitButton, SchemaForm, useSchemaForm } from "./form";
import {
  ChoiceField,
  fieldsetClass,
  InputField,
  legendClass,
  linkClass,
  TextAreaField,
} from "./form-fields";

export const fuelLabels: Record<(typeof FUELS)[number], string> = {
  diesel: "Diesel",
  petrol: "Petrol",
  hybrid: "Hybrid",
  other: "Other",
};

/**
 * vehicleSchema with messages for empty required fields and unreadable gear ratios (an empty
 * field reaches the schema as undefined, and the shared schema has no message for that case).
 * Used by the form in the browser and by the create and edit actions alike.
 */
export const vehicleFormSchema = vehicleSchema.extend({
  name: z.string({ error: "Give the vehicle a name." }).pipe(vehicleSchema.shape.name),
  identifier: z
    .string({ error: "Give the vehicle a short identifier, e.g. its fleet number." })
    .pipe(vehicleSchema.shape.identifier),
  gearRatios: z
    .string()
    .optional()
    .refine(
      (v) =>
        !v ||
        v
          .split(/[\s,;]+/)
          .filter(Boolean)
          .every((x) => Number.isFinite(Number(x))),
      "Gear ratios are numbers separated by spaces or commas, e.g. 3.73 2.05 1.32.",
    )
    .pipe(vehicleSchema.shape.gearRatios as unknown as z.ZodType<number[], string | undefined>),
});

/** A stored vehicle as the form's starting values (strings, as a form posts them). */
export function vehicleDefaults(v?: {
  name: string;
  identifier: string;
  cylinders: number;
  stroke: number;
  fuel: string;
  idleRpm: number;
  firingOrderOverride: number | null;
  transmissionType: string;
  gearRatios: number[];
  damperType: string;
  damperVariant: string;
  primaryInertiaKgM2: number | null;
  secondaryInertiaKgM2: number | null;
  springRateNmPerDeg: number | null;
  damperTravelLimitDeg: number | null;
  rattleLimitRadS2: number;
  notes: string;
}): Record<string, string> {
  if (!v) {
    return {
      cylinders: "4",
      stroke: "4",
      fuel: "diesel",
      idleRpm: "800",
      transmissionType: "manual",
      damperType: "dual-mass-flywheel",
      damperVariant: "A",
      rattleLimitRadS2: String(DEFAULT_RATTLE_LIMIT_RAD_S2),
    };
  }
  const s = (n: number | null) => (n === null ? "" : String(n));
  return {
    name: v.name,
    identifier: v.identifier,
    cylinders: String(v.cylinders),
    stroke: String(v.stroke),
    fuel: v.fuel,
    idleRpm: String(v.idleRpm),
    firingOrderOverride: s(v.firingOrderOverride),
    transmissionType: v.transmissionType,
    gearRatios: v.gearRatios.join(" "),
    damperType: v.damperType,
    damperVariant: v.damperVariant,
    primaryInertiaKgM2: s(v.primaryInertiaKgM2),
    secondaryInertiaKgM2: s(v.secondaryInertiaKgM2),
    springRateNmPerDeg: s(v.springRateNmPerDeg),
    damperTravelLimitDeg: s(v.damperTravelLimitDeg),
    rattleLimitRadS2: String(v.rattleLimitRadS2),
    notes: v.notes,
  };
}

/** Create and edit share this form; vehicleSchema checks it in the browser and the action. */
export function VehicleForm({
  lastResult,
  defaults,
  submitLabel,
  cancelTo,
}: {
  lastResult: SubmissionResult<string[]> | null | undefined;
  defaults: Record<string, string>;
  submitLabel: string;
  cancelTo: string;
}) {
  const [form, fields] = useSchemaForm("vehicle", vehicleFormSchema, lastResult, defaults);
  return (
    <SchemaForm form={form} intent="save" className="space-y-6">
      <div className="grid gap-4 sm:grid-cols-2">
        <InputField label="Name" meta={fields.name} hint="E.g. “Kestrel estate, diesel”." />
        <InputField
          label="Identifier"
          meta={fields.identifier}
          hint="The team's short code for it, e.g. a fleet number such as KST-04. Unique in the team."
        />
      </div>
      <fieldset className={fieldsetClass}>
        <legend className={legendClass}>Engine</legend>
        <div className="grid gap-4 sm:grid-cols-3">
          <InputField label="Cylinders" meta={fields.cylinders} numeric />
          <ChoiceField
            label="Stroke cycle"
            meta={fields.stroke}
            options={[
              { value: "4", label: "Four-stroke" },
              { value: "2", label: "Two-stroke" },
            ]}
          />
          <ChoiceField
            label="Fuel"
            meta={fields.fuel}
            options={FUELS.map((f) => ({ value: f, label: fuelLabels[f] }))}
          />
          <InputField label="Idle speed" unit="rpm" meta={fields.idleRpm} numeric />
          <InputField
            label="Firing order override"
            unit="orders per crank revolution"
            meta={fields.firingOrderOverride}
            numeric
            hint="Leave empty for z/2 (four-stroke) or z (two-stroke); set it for cylinder deactivation or odd firing."
          />
        </div>
      </fieldset>
      <fieldset className={fieldsetClass}>
        <legend className={legendClass}>Transmission</legend>
        <div className="grid gap-4 sm:grid-cols-2">
          <ChoiceField
            label="Type"
            meta={fields.transmissionType}
            options={TRANSMISSION_TYPES.map((t) => ({ value: t, label: transmissionLabels[t] }))}
          />
          <InputField
            label="Gear ratios"
            meta={fields.gearRatios}
            hint="Optional, first gear first, separated by spaces or commas, e.g. 3.73 2.05 1.32."
          />
        </div>
      </fieldset>
      <fieldset className={fieldsetClass}>
        <legend className={legendClass}>Damper</legend>
        <div className="grid gap-4 sm:grid-cols-2">
          <ChoiceField
            label="Damper type"
            meta={fields.damperType}
            options={DAMPER_TYPES.map((d) => ({ value: d, label: damperLabels[d] }))}
          />
          <InputField
            label="Variant fitted"
            meta={fields.damperVariant}
            hint="A label or part number; new drive logs take it unless you say otherwise."
          />
          <InputField
            label="Primary inertia"
            unit="kg·m²"
            meta={fields.primaryInertiaKgM2}
            numeric
          />
          <InputField
            label="Secondary inertia"
            unit="kg·m²"
            meta={fields.secondaryInertiaKgM2}
            numeric
          />
          <InputField label="Spring rate" unit="N·m/°" meta={fields.springRateNmPerDeg} numeric />
          <InputField
            label="Damper travel limit"
            unit="°"
            meta={fields.damperTravelLimitDeg}
            numeric
            hint={DAMPER_TRAVEL_HINT}
          />
        </div>
      </fieldset>
      <fieldset className={fieldsetClass}>
        <legend className={legendClass}>Rattle check</legend>
        <div className="max-w-md">
          <InputField
            label="Rattle limit"
            unit="rad/s²"
            meta={fields.rattleLimitRadS2}
            numeric
            hint={`Gearbox-input angular acceleration at idle. Default ${DEFAULT_RATTLE_LIMIT_RAD_S2} rad/s²: ${RATTLE_LIMIT_SOURCE}`}
          />
        </div>
      </fieldset>
      <TextAreaField label="Notes" meta={fields.notes} />
      <div className="flex items-center gap-4">
        <SubmitButton>{submitLabel}</SubmitButton>
        <Link to={cancelTo} className={linkClass}>
          Cancel
        </Link>
      </div>
    </SchemaForm>
  );
}
