import type { SubmissionResult } from "@conform-to/react";
import { z } from "zod";
import { SubmitButton, SchemaForm, useSchemaForm } from "./form";
import { InputField } from "./form-fields";

const number = (schema: z.ZodNumber) =>
  z.preprocess((v) => (v === "" || v === undefined ? undefined : Number(v)), schema.optional());

/** The settings a new analysis version may change; empty fields keep the vehicle's and the defaults. */
export const reanalyseSettings = {
  firingOrder: number(
    z
      .number({ error: "The firing order is a number of orders per revolution." })
      .positive("The firing order is positive.")
      .max(24, "At most order 24."),
  ),
  revsPerBlock: number(
    z
      .number({ error: "Revolutions per block is a whole number." })
      .int("Revolutions per block is a whole number.")
      .min(1, "At least 1 revolution per block.")
      .max(256, "At most 256 revolutions per block."),
  ),
  binRpm: number(
    z
      .number({ error: "The bin width is a number of rpm." })
      .positive("The bin width is positive.")
      .max(1000, "At most 1000 rpm."),
  ),
};

/** Overrides for a new analysis version of one drive log (the drive-log page's form). */
export const reanalyseSchema = z.object({ intent: z.literal("reanalyse"), ...reanalyseSettings });

export function ReanalyseForm({
  lastResult,
  current,
}: {
  lastResult: SubmissionResult<string[]> | null | undefined;
  current: { firingOrder: number; revsPerBlock: number; binRpm: number } | null;
}) {
  const [form, fields] = useSchemaForm("reanalyse", reanalyseSchema, lastResult);
  return (
    <SchemaForm form={form} intent="reanalyse" className="space-y-4">
      <ReanalyseFields fields={fields} current={current} />
      <p className="text-sm text-neutral-600">
        Re-analysing makes a new analysis version; the earlier versions are kept.
      </p>
      <SubmitButton tone="secondary">Re-analyse</SubmitButton>
    </SchemaForm>
  );
}

type SettingField = Parameters<typeof InputField>[0]["meta"];

/** The three settings a re-analysis may change; also the vehicle's "re-analyse all" panel's. */
export function ReanalyseFields({
  fields,
  current,
}: {
  fields: { firingOrder: SettingField; revsPerBlock: SettingField; binRpm: SettingField };
  current: { firingOrder?: number; revsPerBlock?: number; binRpm?: number } | null;
}) {
  const now = (x: number | undefined, unit = "") =>
    x === undefined
      ? undefined
      : `Now ${x}${unit}. Empty keeps the vehicle's setting or the default.`;
  return (
    <div className="grid gap-4 sm:grid-cols-3">
      <InputField
        label="Firing order"
        unit="orders per revolution"
        meta={fields.firingOrder}
        numeric
        hint={now(current?.firingOrder)}
      />
      <InputField
        label="Revolutions per block"
        meta={fields.revsPerBlock}
        numeric
        hint={now(current?.revsPerBlock)}
      />
      <InputField
        label="Engine-speed bin width"
        unit="rpm"
        meta={fields.binRpm}
        numeric
        hint={now(current?.binRpm, " rpm")}
      />
    </div>
  );
}
