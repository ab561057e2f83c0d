/**
 * The team page's "Logger vocabulary": the team's own names for its loggers' channels (read
 * before the built-in recognition on every upload) and whether imperfect logs are repaired or
 * refused. Engineers and admins edit; everyone else reads.
 */
import type { SubmissionResult } from "@conform-to/react";
import { Form } from "react-router";
import {
  addChannelNameSchema,
  CHANNEL_ROLES,
  MAX_CHANNEL_NAMES,
  roleLabels,
  type TeamIngestSettings,
} from "~/lib/domain/channel-names";
import { SPEED_UNITS, TIME_UNITS } from "~/lib/signal/units";
import { CsrfInput } from "./csrf-input";
import { Field, IntentButton, SchemaForm, SubmitButton, useSchemaForm } from "./form";
import { ChoiceField } from "./form-fields";
import { Card, EmptyState, TableHead, tableClass, tdClass } from "./page";

const shortRole = { time: "time", crank: "crank", gearbox: "gearbox" } as const;
const unitOptions = [
  { value: "", label: "As the file says" },
  ...[...TIME_UNITS, ...SPEED_UNITS].map((u) => ({ value: u, label: u })),
];

export function LoggerVocabularyCard({
  settings,
  canEdit,
  lastResult,
}: {
  settings: TeamIngestSettings;
  canEdit: boolean;
  lastResult: SubmissionResult<string[]> | undefined;
}) {
  const names = settings.channelNames;
  return (
    <Card title="Logger vocabulary" id="logger-vocabulary">
      <p className="text-sm text-neutral-600">
        Your loggers' names for the time, crank-side and gearbox-input channels. Uploads look for
        these first, then for the common English names (time, crank, gearbox, …). Names match
        regardless of case and spaces.
      </p>
      {names.length === 0 ? (
        <div className="mt-3">
          <EmptyState>No names of your own yet: only the common names are recognised.</EmptyState>
        </div>
      ) : (
        <table className={`${tableClass} mt-3`}>
          <caption className="sr-only">The team's channel names</caption>
          <TableHead
            columns={["Channel", "Read as", "Unit"]}
            action={canEdit ? "Remove" : undefined}
          />
          <tbody>
            {names.map((c) => (
              <tr key={c.name}>
                <td className={`${tdClass} font-mono break-all`}>{c.name}</td>
                <td className={tdClass}>{shortRole[c.role]}</td>
                <td className={tdClass}>{c.unit ?? "as the file says"}</td>
                {canEdit ? (
                  <td className={tdClass}>
                    <IntentButton
                      intent="remove-channel-name"
                      fields={{ name: c.name }}
                      tone="secondary"
                    >
                      Remove<span className="sr-only"> {c.name}</span>
                    </IntentButton>
                  </td>
                ) : null}
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {canEdit && names.length < MAX_CHANNEL_NAMES ? <AddName lastResult={lastResult} /> : null}
      <StrictSetting strict={settings.strict} canEdit={canEdit} />
    </Card>
  );
}

function AddName({ lastResult }: { lastResult: SubmissionResult<string[]> | undefined }) {
  const [form, fields] = useSchemaForm("channel-name", addChannelNameSchema, lastResult, {
    role: "crank",
  });
  return (
    <SchemaForm form={form} intent="add-channel-name" className="mt-4 space-y-3">
      <div className="grid gap-3">
        <Field label="Channel name" meta={fields.name} hint="As in the file, e.g. n_kw" />
        <ChoiceField
          label="Read as"
          meta={fields.role}
          options={CHANNEL_ROLES.map((r) => ({ value: r, label: roleLabels[r] }))}
        />
        <ChoiceField label="Unit" meta={fields.unit} options={unitOptions} />
      </div>
      <SubmitButton tone="secondary">Add channel name</SubmitButton>
    </SchemaForm>
  );
}

function StrictSetting({ strict, canEdit }: { strict: boolean; canEdit: boolean }) {
  return (
    <div className="mt-5 border-t border-neutral-200 pt-4">
      <h3 className="text-sm font-semibold text-neutral-900">Imperfect logs</h3>
      <p className="mt-1 text-sm text-neutral-600" data-strict-ingest={strict ? "on" : "off"}>
        {strict
          ? "Refused: a drive log with a sensor dropout, missing rows or uneven timestamps fails and says where."
          : "Repaired where honest: short dropouts and gaps are interpolated, uneven timestamps resampled, and every repair is listed on the drive log. Longer gaps split the log into sections."}
      </p>
      {canEdit ? (
        <Form method="post" className="mt-3">
          <CsrfInput />
          <input type="hidden" name="strict" value={strict ? "off" : "on"} />
          <SubmitButton name="intent" value="set-strict" tone="secondary">
            {strict ? "Repair imperfect logs instead" : "Refuse imperfect logs instead"}
          </SubmitButton>
        </Form>
      ) : null}
    </div>
  );
}
