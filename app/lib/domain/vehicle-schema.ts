import { z } from "zod";
import {
  DAMPER_TYPES,
  DEFAULT_RATTLE_LIMIT_RAD_S2,
  FUELS,
  LOG_CONDITIONS,
  TRANSMISSION_TYPES,
} from "./drive-log-terms";

// One schema per form, shared by the browser's hints and the actions and API (docs/conventions.md).
// Limits match the columns in app/lib/infra/db/schema-drive-logs.ts, so nothing is cut silently.

/**
 * Stop-to-stop spring travel of a torsional damper is some tens of degrees (a dual-mass flywheel's
 * arc springs allow roughly 40–90°, common practice, from memory); 180° leaves room for any
 * design while refusing a value typed in the wrong unit.
 */
export const DAMPER_TRAVEL_LIMIT_MAX_DEG = 180;

/** What the travel limit is and what it is compared with (the form's hint, the vehicle card). */
export const DAMPER_TRAVEL_HINT =
  "Optional. The spring travel between the damper's end stops, stop to stop. The peak-to-peak twist of each engine start and stop is compared with it; the static twist under load is not measured by speed sensors.";

/** An optional number; `notNumber` says what to type when the text is not one. */
const optionalNumber = (schema: z.ZodNumber, notNumber: string) =>
  z.preprocess(
    (v) => (v === "" || v === null ? undefined : v),
    z.coerce.number({ error: notNumber }).pipe(schema).optional(),
  );

const text = (max: number, what: string) =>
  z.string().trim().max(max, `${what} has at most ${max} characters.`);

export const vehicleSchema = z.object({
  name: text(120, "A name").min(1, "Give the vehicle a name."),
  identifier: text(40, "An identifier")
    .min(1, { error: "Give the vehicle a short identifier, e.g. its fleet number.", abort: true })
    .regex(/^[A-Za-z0-9][A-Za-z0-9 ._/-]*$/, "Use letters, digits, spaces and . _ / - only."),
  cylinders: z.coerce
    .number({ error: "Enter the number of cylinders." })
    .int("Cylinders is a whole number.")
    .min(1, "At least 1 cylinder.")
    .max(16, "At most 16 cylinders."),
  stroke: z.coerce
    .number()
    .pipe(z.union([z.literal(4), z.literal(2)], { error: "Choose four-stroke or two-stroke." })),
  fuel: z.enum(FUELS, { error: "Choose the fuel." }).default("diesel"),
  idleRpm: z.coerce
    .number({ error: "Enter the idle speed in rpm." })
    .int("Idle speed is a whole number of rpm.")
    .min(300, "Idle speed is at least 300 rpm.")
    .max(2000, "Idle speed is at most 2000 rpm.")
    .default(800),
  firingOrderOverride: optionalNumber(
    z
      .number()
      .positive("The firing order is a positive number of orders.")
      .max(12, "At most order 12."),
    "The firing order is a number, e.g. 2 or 1.5.",
  ),
  transmissionType: z
    .enum(TRANSMISSION_TYPES, { error: "Choose the transmission type." })
    .default("manual"),
  gearRatios: z
    .preprocess(
      (v) =>
        typeof v === "string"
          ? v
              .split(/[\s,;]+/)
              .filter(Boolean)
              .map(Number)
          : v,
      z
        .array(
          z
            .number()
            .positive("Each gear ratio is a positive number.")
            .max(30, "A gear ratio is at most 30."),
        )
        .max(12, "At most 12 gears."),
    )
    .default([]),
  damperType: z
    .enum(DAMPER_TYPES, { error: "Choose the damper type." })
    .default("dual-mass-flywheel"),
  damperVariant: text(80, "A damper variant")
    .min(1, "Name the damper variant fitted, e.g. 'A' or a part number.")
    .default("A"),
  primaryInertiaKgM2: optionalNumber(
    z.number().positive("Inertia is positive.").max(5, "At most 5 kg·m²."),
    "Inertia is a number in kg·m², e.g. 0.12.",
  ),
  secondaryInertiaKgM2: optionalNumber(
    z.number().positive("Inertia is positive.").max(5, "At most 5 kg·m²."),
    "Inertia is a number in kg·m², e.g. 0.05.",
  ),
  springRateNmPerDeg: optionalNumber(
    z.number().positive("Spring rate is positive.").max(1000, "At most 1000 N·m/°."),
    "Spring rate is a number in N·m/°, e.g. 8.",
  ),
  damperTravelLimitDeg: optionalNumber(
    z
      .number()
      .positive("The damper travel limit is more than 0°.")
      .max(
        DAMPER_TRAVEL_LIMIT_MAX_DEG,
        `The damper travel limit is at most ${DAMPER_TRAVEL_LIMIT_MAX_DEG}° (stop to stop).`,
      ),
    "The damper travel limit is a number of degrees, e.g. 60.",
  ),
  rattleLimitRadS2: z.coerce
    .number({ error: "The rattle limit is a number of rad/s², e.g. 500." })
    .positive("The rattle limit is a positive angular acceleration in rad/s².")
    .max(100_000, "At most 100 000 rad/s².")
    .default(DEFAULT_RATTLE_LIMIT_RAD_S2),
  notes: text(5000, "Notes").default(""),
});
export type VehicleInput = z.output<typeof vehicleSchema>;

/** The test metadata that comes with an uploaded drive log. */
export const logMetadataSchema = z.object({
  condition: z
    .enum(LOG_CONDITIONS, { error: `Choose a test condition: ${LOG_CONDITIONS.join(", ")}.` })
    .default("other"),
  gear: optionalNumber(
    z
      .number()
      .int("The gear is a whole number.")
      .min(-1, "Reverse is -1.")
      .max(12, "At most gear 12."),
    "The gear is a whole number: -1 for reverse, 0 for neutral.",
  ),
  damperVariant: z.preprocess(
    (v) => (v === "" ? undefined : v),
    text(80, "A damper variant").optional(),
  ),
  testDate: z.preprocess(
    (v) => (v === "" ? undefined : v),
    z.iso.date("Give the test date as YYYY-MM-DD.").optional(),
  ),
  notes: text(5000, "Driver notes").default(""),
});
export type LogMetadata = z.output<typeof logMetadataSchema>;
