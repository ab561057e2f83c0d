/**
 * What a programme target limits: the isolation at the firing order, idle gear rattle, the peak
 * amplification through the damper's resonance at engine start and stop (dB), or the margin of
 * the start/stop twist to the damper's travel limit (degrees).
 */
export const TARGET_KINDS = ["isolation", "rattle", "start-stop", "twist-margin"] as const;
export type TargetKind = (typeof TARGET_KINDS)[number];
