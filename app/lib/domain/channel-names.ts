/**
 * A team's own channel names (a team setting: which of its loggers' channels is time, crank or
 * gearbox, and in which unit) and the channel choice an upload or a re-analysis may send
 * (timeChannel, crankChannel, …). One zod schema each, shared by the forms, the API and the
 * data layer, so the browser's hints and the server's check agree.
 */
import { z } from "zod";
import { SPEED_UNITS, TIME_UNITS } from "../signal/units.ts";
import type { ChannelName, ChannelRole, SpeedUnit, TimeUnit } from "../signal/types.ts";
import type { IngestMapping } from "./drive-log-terms";

export const CHANNEL_ROLES = ["time", "crank", "gearbox"] as const satisfies readonly ChannelRole[];
export const roleLabels: Record<ChannelRole, string> = {
  time: "Time",
  crank: "Crank-side speed",
  gearbox: "Gearbox-input speed",
};
/** At most this many names per team: enough for several loggers, small enough to show on one card. */
export const MAX_CHANNEL_NAMES = 60;

const speedUnits = SPEED_UNITS as readonly [SpeedUnit, ...SpeedUnit[]];
const timeUnits = TIME_UNITS as readonly [TimeUnit, ...TimeUnit[]];
const blank = (v: unknown) => (v === "" || v === null ? undefined : v);

/** Names match case- and space-insensitively (types.ts ChannelName), so they are compared so. */
export function channelKey(name: string): string {
  return name.trim().toLowerCase().replace(/\s+/g, "");
}

const channelNameShape = {
  name: z
    .string({ error: "Enter the channel's name as the logger writes it." })
    .trim()
    .min(1, "Enter the channel's name as the logger writes it.")
    .max(120, "A channel name has at most 120 characters."),
  role: z.enum(CHANNEL_ROLES, { error: "Choose time, crank-side or gearbox-input speed." }),
  unit: z.preprocess(blank, z.enum([...timeUnits, ...speedUnits]).optional()),
};

// A time channel in rpm (or a speed in ms) would be read wrongly on every upload.
function unitFits(c: { role: ChannelRole; unit?: string }, ctx: z.RefinementCtx) {
  const fits =
    c.unit === undefined ||
    (c.role === "time"
      ? (timeUnits as readonly string[]).includes(c.unit)
      : (speedUnits as readonly string[]).includes(c.unit));
  if (!fits)
    ctx.addIssue({
      code: "custom",
      path: ["unit"],
      message:
        c.role === "time"
          ? "A time channel is in s or ms."
          : `A speed channel is in ${SPEED_UNITS.join(", ")}.`,
    });
}

export const channelNameSchema = z.object(channelNameShape).superRefine(unitFits);

/** The team page's form that adds one name. */
export const addChannelNameSchema = z
  .object({ intent: z.literal("add-channel-name"), ...channelNameShape })
  .superRefine(unitFits);

/** The whole list as stored: unique names, at most MAX_CHANNEL_NAMES. */
export const channelNamesSchema = z
  .array(channelNameSchema)
  .max(MAX_CHANNEL_NAMES, `At most ${MAX_CHANNEL_NAMES} channel names per team.`)
  .superRefine((list, ctx) => {
    const seen = new Set<string>();
    list.forEach((c, i) => {
      const key = channelKey(c.name);
      if (seen.has(key))
        ctx.addIssue({
          code: "custom",
          path: [i, "name"],
          message: `“${c.name}” is already in the list.`,
        });
      seen.add(key);
    });
  });

/** What the database holds; a row it cannot read (hand-edited) counts as no names. */
export function readChannelNames(stored: unknown): ChannelName[] {
  const parsed = channelNamesSchema.safeParse(stored ?? []);
  return parsed.success ? (parsed.data as ChannelName[]) : [];
}

/** A team's ingest settings as every analysis job gets them (frozen into its settings). */
export interface TeamIngestSettings {
  channelNames: ChannelName[];
  /** Refuse a log with dropouts, gaps or jitter instead of repairing it. */
  strict: boolean;
}

const channel = z.preprocess(
  blank,
  z.string().trim().min(1).max(200, "A channel name has at most 200 characters.").optional(),
);
const speedUnit = z.preprocess(
  blank,
  z.enum(speedUnits, { error: `Use one of ${SPEED_UNITS.join(", ")}.` }).optional(),
);

/**
 * The optional channel choice of an upload (POST /api/v1/vehicles/:id/logs) or a re-analysis:
 * public field names, kept stable. Two roles on one channel are refused.
 */
export const channelChoiceSchema = z
  .object({
    timeChannel: channel,
    crankChannel: channel,
    gearboxChannel: channel,
    crankUnit: speedUnit,
    gearboxUnit: speedUnit,
  })
  .superRefine((c, ctx) => {
    const taken = new Map<string, string>();
    for (const key of ["timeChannel", "crankChannel", "gearboxChannel"] as const) {
      const name = c[key];
      if (name === undefined) continue;
      const other = taken.get(channelKey(name));
      if (other)
        ctx.addIssue({
          code: "custom",
          path: [key],
          message: `“${name}” is already chosen as ${other}.`,
        });
      taken.set(channelKey(name), key);
    }
  });
export type ChannelChoice = z.infer<typeof channelChoiceSchema>;
export const CHANNEL_CHOICE_FIELDS = [
  "timeChannel",
  "crankChannel",
  "gearboxChannel",
  "crankUnit",
  "gearboxUnit",
] as const;

/** The choice as the drive log's chosen mapping; null when nothing was chosen. */
export function choiceMapping(c: ChannelChoice): IngestMapping | null {
  const m: IngestMapping = {
    ...(c.timeChannel ? { timeColumn: c.timeChannel } : {}),
    ...(c.crankChannel ? { crankColumn: c.crankChannel } : {}),
    ...(c.gearboxChannel ? { gearboxColumn: c.gearboxChannel } : {}),
    ...(c.crankUnit ? { crankUnit: c.crankUnit } : {}),
    ...(c.gearboxUnit ? { gearboxUnit: c.gearboxUnit } : {}),
  };
  return Object.keys(m).length ? m : null;
}
