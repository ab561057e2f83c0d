/**
 * The one schema of a programme target as entered: the target form on the vehicle page (strings,
 * checked in the browser and again on the server) and JSON callers (numbers, arrays). The kinds and
 * their limits are explained in ./targets and docs/targets.md.
 */
import { z } from "zod";
import { TARGET_KINDS } from "./target-kinds";
import { LOG_CONDITIONS } from "./drive-log-terms";
import type { TargetInput } from "./targets";

export const RPM_MIN = 0;
export const RPM_MAX = 10_000;
export const MIN_DB_LOW = -40;
export const MIN_DB_HIGH = 60;
export const MAX_RAD_S2_HIGH = 100_000;
/** Start-stop: peak amplification limits, dB (positive = amplified through the resonance). */
export const MAX_DB_LOW = -20;
export const MAX_DB_HIGH = 60;
/** Twist-margin: degrees; the travel limit itself is at most 180° (vehicle-schema.ts). */
export const MIN_MARGIN_DEG_HIGH = 180;

/** "" and null are "not given"; "−" (the typographic minus) is read as "-". */
function toNumber(v: unknown): unknown {
  if (v === "" || v === null || v === undefined) return undefined;
  if (typeof v === "string") return Number(v.trim().replace(/\u2212/g, "-"));
  return v;
}

const rpmField = (what: string) =>
  z.preprocess(
    toNumber,
    z
      .number({ error: `The ${what} engine speed is a number of rpm, e.g. 1000.` })
      .min(RPM_MIN, `The ${what} engine speed is at least ${RPM_MIN} rpm.`)
      .max(RPM_MAX, `The ${what} engine speed is at most ${RPM_MAX} rpm.`)
      .optional(),
  );

/** Checkboxes post one value as a string and several as an array; JSON posts an array. */
const list = (v: unknown): unknown =>
  v === undefined || v === null || v === "" ? [] : Array.isArray(v) ? v : [v];

const gearList = (v: unknown): unknown => {
  if (typeof v === "string") {
    const words = v
      .trim()
      .toLowerCase()
      .split(/[\s,;]+/)
      .filter(Boolean);
    return words.map((w) =>
      w === "r" || w === "reverse" ? -1 : w === "n" || w === "neutral" ? 0 : Number(w),
    );
  }
  return list(v);
};

/**
 * One schema for the target form (strings) and JSON callers (numbers, arrays). The fields of the
 * other kind are ignored, so a form that shows both sets without JavaScript still posts cleanly.
 */
const KIND_FIELDS = {
  isolation: ["rpmFrom", "rpmTo", "minDb"],
  rattle: ["maxRadS2"],
  "start-stop": ["maxDb"],
  "twist-margin": ["minMarginDeg"],
} as const;
const LIMIT_FIELDS = Object.values(KIND_FIELDS).flat();

function dropOtherKind(v: unknown): unknown {
  if (typeof v !== "object" || v === null || Array.isArray(v)) return v;
  const kind = (v as { kind?: unknown }).kind;
  if (!(TARGET_KINDS as readonly unknown[]).includes(kind)) return v;
  const own: readonly string[] = KIND_FIELDS[kind as keyof typeof KIND_FIELDS];
  const copy: Record<string, unknown> = { ...(v as Record<string, unknown>) };
  for (const key of LIMIT_FIELDS) if (!own.includes(key)) delete copy[key];
  return copy;
}

const targetFields = z
  .object({
    kind: z.enum(TARGET_KINDS, {
      error:
        "Choose what the target limits: isolation, rattle, start/stop amplification or twist margin.",
    }),
    name: z
      .string({ error: "Give the target a name, e.g. “Run-up isolation 1000–3000 rpm”." })
      .trim()
      .min(1, "Give the target a name, e.g. “Run-up isolation 1000–3000 rpm”.")
      .max(120, "A name has at most 120 characters."),
    rpmFrom: rpmField("lowest"),
    rpmTo: rpmField("highest"),
    minDb: z.preprocess(
      toNumber,
      z
        .number({ error: "The minimum isolation is a number of dB, e.g. 10 or −2.5." })
        .min(MIN_DB_LOW, `The minimum isolation is at least ${MIN_DB_LOW} dB.`)
        .max(MIN_DB_HIGH, `The minimum isolation is at most ${MIN_DB_HIGH} dB.`)
        .optional(),
    ),
    maxRadS2: z.preprocess(
      toNumber,
      z
        .number({ error: "The maximum angular acceleration is a number of rad/s², e.g. 400." })
        .positive("The maximum angular acceleration is more than 0 rad/s².")
        .max(
          MAX_RAD_S2_HIGH,
          `The maximum angular acceleration is at most ${MAX_RAD_S2_HIGH} rad/s².`,
        )
        .optional(),
    ),
    maxDb: z.preprocess(
      toNumber,
      z
        .number({ error: "The maximum peak amplification is a number of dB, e.g. 8." })
        .min(MAX_DB_LOW, `The maximum peak amplification is at least ${MAX_DB_LOW} dB.`)
        .max(MAX_DB_HIGH, `The maximum peak amplification is at most ${MAX_DB_HIGH} dB.`)
        .optional(),
    ),
    minMarginDeg: z.preprocess(
      toNumber,
      z
        .number({ error: "The minimum twist margin is a number of degrees, e.g. 5." })
        .min(0, "The minimum twist margin is at least 0°.")
        .max(MIN_MARGIN_DEG_HIGH, `The minimum twist margin is at most ${MIN_MARGIN_DEG_HIGH}°.`)
        .optional(),
    ),
    conditions: z.preprocess(
      list,
      z
        .array(z.enum(LOG_CONDITIONS, { error: "Choose test conditions from the list." }))
        .transform((cs) => LOG_CONDITIONS.filter((c) => cs.includes(c))),
    ),
    gears: z.preprocess(
      gearList,
      z
        .array(
          z.coerce
            .number({
              error: "Gears are whole numbers, e.g. 2 3 4 (R for reverse, N for neutral).",
            })
            .int("Gears are whole numbers, e.g. 2 3 4 (R for reverse, N for neutral).")
            .min(-1, "Reverse is R (or -1); there is no lower gear.")
            .max(12, "At most gear 12."),
        )
        .max(14, "At most 14 gears.")
        .transform((gs) => [...new Set(gs)].sort((a, b) => a - b)),
    ),
  })
  // The checks across fields run even when a field has its own error, so one submission
  // reports every problem at once (issue 11). A field that failed may hold anything (NaN, a
  // string), so only readable numbers are compared, and only an absent field is "missing".
  .superRefine(
    (t, ctx) => {
      const num = (v: unknown) => (typeof v === "number" && Number.isFinite(v) ? v : undefined);
      if (t.kind === "isolation") {
        const need = [
          ["rpmFrom", "Enter the lowest engine speed in rpm."],
          ["rpmTo", "Enter the highest engine speed in rpm."],
          ["minDb", "Enter the minimum isolation in dB."],
        ] as const;
        for (const [key, message] of need)
          if (t[key] === undefined) ctx.addIssue({ code: "custom", path: [key], message });
        const from = num(t.rpmFrom);
        const to = num(t.rpmTo);
        if (from !== undefined && to !== undefined && !(from < to))
          ctx.addIssue({
            code: "custom",
            path: ["rpmTo"],
            message: `The highest engine speed must be above the lowest (${from} rpm).`,
          });
      } else if (t.kind === "rattle" && t.maxRadS2 === undefined) {
        ctx.addIssue({
          code: "custom",
          path: ["maxRadS2"],
          message: "Enter the maximum angular acceleration in rad/s².",
        });
      } else if (t.kind === "start-stop" && t.maxDb === undefined) {
        ctx.addIssue({
          code: "custom",
          path: ["maxDb"],
          message: "Enter the maximum peak amplification in dB.",
        });
      } else if (t.kind === "twist-margin" && t.minMarginDeg === undefined) {
        ctx.addIssue({
          code: "custom",
          path: ["minMarginDeg"],
          message: "Enter the minimum twist margin in degrees.",
        });
      }
    },
    { when: (payload) => typeof payload.value === "object" && payload.value !== null },
  )
  .transform((t): TargetInput => {
    const common = { name: t.name, conditions: t.conditions, gears: t.gears };
    switch (t.kind) {
      case "isolation":
        return { kind: t.kind, ...common, rpmFrom: t.rpmFrom!, rpmTo: t.rpmTo!, minDb: t.minDb! };
      case "rattle":
        return { kind: t.kind, ...common, maxRadS2: t.maxRadS2! };
      case "start-stop":
        return { kind: t.kind, ...common, maxDb: t.maxDb! };
      case "twist-margin":
        return { kind: t.kind, ...common, minMarginDeg: t.minMarginDeg! };
    }
  });

export const targetSchema = z.preprocess(dropOtherKind, targetFields);
