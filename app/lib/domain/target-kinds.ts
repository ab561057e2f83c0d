/** What a programme target limits: the isolation at the firing order, or idle gear rattle. */
export const TARGET_KINDS = ["isolation", "rattle"] as const;
export type TargetKind = (typeof TARGET_KINDS)[number];
